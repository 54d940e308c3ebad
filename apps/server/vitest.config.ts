import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["src/**/*.test.ts"],
    setupFiles: ["../../tests/support/fail-on-console-error.ts"],
    testTimeout: 20_000,
  },
});
