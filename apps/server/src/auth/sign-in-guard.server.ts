import { toError } from "../http/errors";

const BUSY_RETRY_MS = 60_000;

function isBusy(thrown: unknown): boolean {
  return typeof thrown === "object" && thrown !== null && "code" in thrown && String(thrown.code).startsWith("SQLITE_BUSY");
}

export interface SignInLimits {
  /** Failed sign-ins allowed per account (e-mail typed) within the window. */
  maxFailuresPerAccount: number;
  /** Failed sign-ins allowed per client address within the window (across accounts). */
  maxFailuresPerAddress: number;
  windowMs: number;
}

/**
 * Sign-in protection: counts failed sign-ins per e-mail typed (whether or not an account has it, so the limit
 * does not reveal which accounts exist) and per client address, in a sliding window. Kept in memory: a restart
 * forgets the counts (the audit log keeps every failure). Also tracks the audit writes sign-in starts without
 * waiting for them (so a sign-in never waits for a running ingest's write lock), so tests and shutdown can settle them.
 */
export class SignInGuard {
  private readonly byAccount = new Map<string, number[]>();
  private readonly byAddress = new Map<string, number[]>();
  private readonly pending = new Set<Promise<void>>();

  constructor(
    readonly limits: SignInLimits,
    private readonly nowMs: () => number = Date.now,
    /**
     * Resolves when the session writes waiting for SQLite's write lock have landed (SessionAdapter.settled). A
     * sign-in's audit row waits for them: when the session write had to wait, the lock was taken, and the audit
     * write would otherwise sit in SQLite's busy handler on the main thread.
     */
    private readonly sessionWritesSettled: () => Promise<void> = () => Promise.resolve(),
  ) {}

  /** How long (ms) this e-mail or address must wait before trying again, or 0 when it may try now. */
  waitMs(email: string, address: string): number {
    const now = this.nowMs();
    const account = this.waitFor(this.byAccount, email, this.limits.maxFailuresPerAccount, now);
    const client = this.waitFor(this.byAddress, address, this.limits.maxFailuresPerAddress, now);
    return Math.max(account, client);
  }

  failed(email: string, address: string): void {
    const now = this.nowMs();
    for (const [map, key] of [[this.byAccount, email], [this.byAddress, address]] as const) {
      const times = this.recent(map, key, now);
      times.push(now);
      map.set(key, times);
    }
  }

  /** A correct password clears that account's failures (the address keeps its count). */
  succeeded(email: string): void {
    this.byAccount.delete(email);
  }

  /**
   * Runs a write in the background. Another connection holding SQLite's write lock longer than the busy timeout
   * (a backup, a tool) only delays it: it is tried again for up to a minute. Any other failure is logged.
   */
  track(write: () => Promise<void>): void {
    const attempt = async (): Promise<void> => {
      await this.sessionWritesSettled();
      let delayMs = 50;
      for (const startedMs = Date.now(); ; ) {
        try {
          return await write();
        } catch (thrown) {
          if (!isBusy(thrown) || Date.now() - startedMs > BUSY_RETRY_MS) throw thrown;
          await new Promise((resolve) => setTimeout(resolve, delayMs));
          delayMs = Math.min(1000, delayMs * 2);
        }
      }
    };
    const tracked: Promise<void> = attempt()
      .catch((thrown: unknown) => console.error(`Calmcrest: a sign-in audit row could not be written: ${toError(thrown).message}`))
      .finally(() => this.pending.delete(tracked));
    this.pending.add(tracked);
  }

  /** Resolves once every background write started so far has finished. */
  async settled(): Promise<void> {
    while (this.pending.size > 0) await Promise.all(this.pending);
  }

  private recent(map: Map<string, number[]>, key: string, now: number): number[] {
    const times = (map.get(key) ?? []).filter((time) => time > now - this.limits.windowMs);
    if (times.length === 0) map.delete(key);
    else map.set(key, times);
    return times;
  }

  private waitFor(map: Map<string, number[]>, key: string, max: number, now: number): number {
    const times = this.recent(map, key, now);
    if (times.length < max) return 0;
    // The oldest failure that still counts must leave the window before one more try is allowed.
    const oldest = times[times.length - max] ?? now;
    return Math.max(1, oldest + this.limits.windowMs - now);
  }
}

/** "14 minutes", "1 minute", "40 seconds": the wait in words, rounded up. */
export function describeWait(waitMs: number): string {
  const seconds = Math.ceil(waitMs / 1000);
  if (seconds < 90) return `${seconds} second${seconds === 1 ? "" : "s"}`;
  const minutes = Math.ceil(seconds / 60);
  return `${minutes} minute${minutes === 1 ? "" : "s"}`;
}
