import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["**/*.test.ts"],
    exclude: ["node_modules/**"],
    setupFiles: ["./support/fail-on-console-error.ts"],
    // Browser tests each start a server and a chromium; one file at a time on a 2-core machine.
    fileParallelism: false,
    testTimeout: 120_000,
    hookTimeout: 180_000,
  },
});
