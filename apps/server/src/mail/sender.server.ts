import type { OutboxMessage } from "@calmcrest/contracts";
import { toError } from "../http/errors";
import { retryDelayMs, type OutboxStore } from "../store/outbox";
import type { MailTransport } from "./transport.server";

export interface MailSenderOptions {
  from: string;
  /** Tries before a message is marked failed. */
  maxAttempts?: number;
  /** Wait after the first failure; doubled after each further one. */
  baseRetryDelayMs?: number;
  maxRetryDelayMs?: number;
}

/**
 * Sends what the outbox holds, after the transaction that queued it has committed. Woken after every committed
 * change (a store listener) and by a timer for the next retry; one pass at a time, oldest message first. A failed
 * send is recorded on its row (attempts, error) and tried again after 30 s, 1 min, 2 min … (at most 1 h apart),
 * up to 8 tries, then marked failed. A message is marked sent only after the transport accepted it, so a server
 * stopped mid-send sends it again at the next start (at least once, never lost).
 */
export class MailSender {
  private running: Promise<void> | null = null;
  private again = false;
  private timer: NodeJS.Timeout | null = null;
  private stopped = false;
  private readonly maxAttempts: number;
  private readonly baseRetryDelayMs: number;
  private readonly maxRetryDelayMs: number;

  constructor(
    private readonly outbox: OutboxStore,
    readonly transport: MailTransport,
    private readonly options: MailSenderOptions,
  ) {
    this.maxAttempts = options.maxAttempts ?? 8;
    this.baseRetryDelayMs = options.baseRetryDelayMs ?? 30_000;
    this.maxRetryDelayMs = options.maxRetryDelayMs ?? 3_600_000;
  }

  /** Starts a pass now (or right after the one running). */
  wake(): void {
    if (this.stopped) return;
    if (this.running) {
      this.again = true;
      return;
    }
    this.running = this.pass().finally(() => {
      this.running = null;
      if (this.again) {
        this.again = false;
        this.wake();
      }
    });
  }

  /** Resolves when no pass is running (for tests and shutdown). */
  async idle(): Promise<void> {
    while (this.running) await this.running;
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    await this.idle();
    this.transport.close();
  }

  private async pass(): Promise<void> {
    try {
      for (;;) {
        const due = await this.outbox.due(new Date());
        if (due.length === 0 || this.stopped) break;
        for (const message of due) await this.sendOne(message);
      }
      this.scheduleNext(await this.outbox.nextDueAt());
    } catch (thrown) {
      // The database went away (shutdown) or a write failed: try again later rather than crash the server.
      if (!this.stopped) {
        console.error(`Calmcrest mail: the outbox could not be read or updated: ${toError(thrown).message}`);
        this.scheduleNext(new Date(Date.now() + this.baseRetryDelayMs));
      }
    }
  }

  private async sendOne(message: OutboxMessage): Promise<void> {
    try {
      const { messageId } = await this.transport.send({ from: this.options.from, to: message.to, subject: message.subject, text: message.text, html: message.html });
      await this.outbox.markSent(message.id, { transport: this.transport.name, messageId });
    } catch (thrown) {
      const attempts = message.attempts + 1;
      const retryAt = attempts >= this.maxAttempts ? null : new Date(Date.now() + retryDelayMs(attempts, this.baseRetryDelayMs, this.maxRetryDelayMs));
      await this.outbox.markAttemptFailed(message.id, { transport: this.transport.name, error: toError(thrown).message, retryAt });
    }
  }

  private scheduleNext(at: Date | null): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    if (!at || this.stopped) return;
    const delayMs = Math.max(0, at.getTime() - Date.now());
    this.timer = setTimeout(() => {
      this.timer = null;
      this.wake();
    }, delayMs);
    this.timer.unref();
  }
}
