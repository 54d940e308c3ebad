import { afterEach, beforeEach, vi } from "vitest";

// Console errors fail tests unless a test expects them (it can call `expectConsoleError()` first),
// so warnings cannot pile up unseen.
let allowed = 0;
let unexpected: string[] = [];

export function expectConsoleError(count = 1) {
  allowed += count;
}

beforeEach(() => {
  allowed = 0;
  unexpected = [];
  vi.spyOn(console, "error").mockImplementation((...args: unknown[]) => {
    if (allowed > 0) {
      allowed -= 1;
      return;
    }
    unexpected.push(args.map(String).join(" "));
  });
});

afterEach(() => {
  vi.restoreAllMocks();
  if (unexpected.length > 0) {
    const messages = unexpected.join("\n");
    unexpected = [];
    throw new Error(`console.error was called unexpectedly:\n${messages}`);
  }
});
