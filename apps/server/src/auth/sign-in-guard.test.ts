import { describe, expect, it } from "vitest";
import { SignInGuard, describeWait } from "./sign-in-guard.server";

describe("the sign-in guard", () => {
  it("lets 5 failures per account through in 15 minutes, then asks to wait until the oldest leaves the window", () => {
    let now = 1_000_000;
    const guard = new SignInGuard({ maxFailuresPerAccount: 5, maxFailuresPerAddress: 20, windowMs: 15 * 60_000 }, () => now);
    for (let failure = 0; failure < 5; failure += 1) {
      expect(guard.waitMs("a@x.test", "10.0.0.1")).toBe(0);
      guard.failed("a@x.test", "10.0.0.1");
      now += 60_000;
    }
    // Failures at 0..4 min; now is 5 min: the first leaves the window at 15 min.
    expect(guard.waitMs("a@x.test", "10.0.0.1")).toBe(10 * 60_000);
    expect(guard.waitMs("b@x.test", "10.0.0.2")).toBe(0);
    now += 10 * 60_000;
    expect(guard.waitMs("a@x.test", "10.0.0.1")).toBe(0);
  });

  it("limits an address across accounts, and a correct password clears only the account's count", () => {
    let now = 0;
    const guard = new SignInGuard({ maxFailuresPerAccount: 3, maxFailuresPerAddress: 4, windowMs: 1000 }, () => now);
    for (const email of ["a", "b", "c", "d"]) guard.failed(email, "10.0.0.9");
    expect(guard.waitMs("e", "10.0.0.9")).toBe(1000);
    expect(guard.waitMs("e", "10.0.0.8")).toBe(0);
    guard.failed("a", "10.0.0.8");
    guard.failed("a", "10.0.0.8");
    guard.succeeded("a");
    guard.failed("a", "10.0.0.7");
    expect(guard.waitMs("a", "10.0.0.7")).toBe(0);
    now = 1001;
    expect(guard.waitMs("e", "10.0.0.9")).toBe(0);
  });

  it("states the wait in seconds or whole minutes, rounded up", () => {
    expect(describeWait(1)).toBe("1 second");
    expect(describeWait(40_000)).toBe("40 seconds");
    expect(describeWait(14 * 60_000 + 1)).toBe("15 minutes");
    expect(describeWait(60_001 + 30_000)).toBe("2 minutes");
  });
});
