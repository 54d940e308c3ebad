import type { Knex } from "knex";
import type { MailKind, MailLink, OutboxMessage, OutboxStatus } from "@calmcrest/contracts";
import type { StoreCore } from "./core";

// The outbox: every e-mail Calmcrest writes is a row here, inserted by `queueMail` inside the transaction of the
// change it reports (a published version, a comment, an invitation). Either both commit or neither does, so a
// crash can lose neither the change nor its notification. The mail sender (apps/server/src/mail) picks the row up
// after the commit, hands it to the transport, and records the attempt here (retrying with backoff on failure).

/** A message to queue: one recipient, the subject, both parts (as they will be sent) and the links it carries. */
export interface QueuedMail {
  /** The recipient's address. */
  to: string;
  /** The recipient's account, when there is one (kept so the message can be traced to a person). */
  toUserId?: string | null;
  subject: string;
  /** Plain-text part. */
  text: string;
  /** HTML part: build it with composeMail (apps/server/src/mail/compose.ts), which renders through the sanitising Markdown renderer. */
  html: string;
  kind: MailKind;
  links?: MailLink[];
}

interface OutboxRow {
  id: number;
  kind: MailKind;
  to_address: string;
  to_user_id: string | null;
  subject: string;
  text_body: string;
  html_body: string;
  links: string;
  status: OutboxStatus;
  attempts: number;
  last_error: string | null;
  created_at: string;
  next_attempt_at: string | null;
  sent_at: string | null;
  transport: "outbox" | "smtp" | null;
  message_id: string | null;
}

function messageView(row: OutboxRow): OutboxMessage {
  return {
    id: row.id,
    kind: row.kind,
    to: row.to_address,
    subject: row.subject,
    text: row.text_body,
    html: row.html_body,
    links: JSON.parse(row.links) as MailLink[],
    status: row.status,
    attempts: row.attempts,
    lastError: row.last_error,
    createdAt: row.created_at,
    nextAttemptAt: row.status === "queued" || row.status === "retrying" ? row.next_attempt_at : null,
    sentAt: row.sent_at,
    transport: row.transport,
  };
}

/**
 * Queues one e-mail in the transaction `trx` of the change it reports (call it inside `store.write`). The message is
 * sent only after that transaction commits; if it rolls back, the message is gone with the change.
 *
 * Example, in a store write:
 * ```ts
 * await core.write(async ({ trx, audit }) => {
 *   await trx("invitation").insert(...);
 *   await audit({ ... });
 *   await queueMail(trx, { kind: "invitation", to: email, subject: "You are invited to Calmcrest", ...composeMail({...}) });
 * });
 * ```
 * Returns the outbox id.
 */
export async function queueMail(trx: Knex.Transaction, mail: QueuedMail): Promise<number> {
  const now = new Date().toISOString();
  const [inserted] = await trx("outbox")
    .insert({
      kind: mail.kind,
      to_address: mail.to,
      to_user_id: mail.toUserId ?? null,
      subject: mail.subject,
      text_body: mail.text,
      html_body: mail.html,
      links: JSON.stringify(mail.links ?? []),
      status: "queued",
      attempts: 0,
      created_at: now,
      next_attempt_at: now,
    })
    .returning<{ id: number }[]>("id");
  if (!inserted) throw new Error("The outbox row was not written.");
  return inserted.id;
}

/** How long to wait before try number `attempts + 1` after `attempts` failed ones: doubling from the base, capped. */
export function retryDelayMs(attempts: number, baseDelayMs: number, maxDelayMs: number): number {
  return Math.min(maxDelayMs, baseDelayMs * 2 ** Math.max(0, attempts - 1));
}

export function outboxStore(core: StoreCore) {
  return {
    queueMail,

    /** The newest messages first (at most `limit`), optionally to one address. */
    async list(options: { limit?: number; to?: string } = {}): Promise<OutboxMessage[]> {
      const query = core.knex("outbox").orderBy("id", "desc").limit(options.limit ?? 500).select<OutboxRow[]>("*");
      if (options.to !== undefined) void query.where({ to_address: options.to });
      return (await query).map(messageView);
    },

    /** Messages due for a send at `now`, oldest first. */
    async due(now: Date, limit = 20): Promise<OutboxMessage[]> {
      const rows = await core
        .knex("outbox")
        .whereIn("status", ["queued", "retrying"])
        .where("next_attempt_at", "<=", now.toISOString())
        .orderBy("id")
        .limit(limit)
        .select<OutboxRow[]>("*");
      return rows.map(messageView);
    },

    /** When the next unsent message is due, or null when none waits. */
    async nextDueAt(): Promise<Date | null> {
      const row = await core.knex("outbox").whereIn("status", ["queued", "retrying"]).min<{ next: string | null }>({ next: "next_attempt_at" }).first();
      return row?.next ? new Date(row.next) : null;
    },

    /** Records a send the transport accepted. */
    markSent(id: number, details: { transport: "outbox" | "smtp"; messageId: string | null }): Promise<void> {
      return core.write(
        async ({ trx }) => {
          await trx("outbox")
            .where({ id })
            .update({ status: "sent", attempts: trx.raw("attempts + 1"), sent_at: new Date().toISOString(), transport: details.transport, message_id: details.messageId, next_attempt_at: null });
        },
        { audited: false },
      );
    },

    /**
     * Records a failed send: tried again at `retryAt`, or given up (`failed`) when `retryAt` is null. The error is
     * kept on the row and shown on the Outbox page.
     */
    markAttemptFailed(id: number, details: { transport: "outbox" | "smtp"; error: string; retryAt: Date | null }): Promise<void> {
      return core.write(
        async ({ trx }) => {
          await trx("outbox")
            .where({ id })
            .update({
              status: details.retryAt ? "retrying" : "failed",
              attempts: trx.raw("attempts + 1"),
              last_error: details.error.slice(0, 2000),
              transport: details.transport,
              next_attempt_at: details.retryAt?.toISOString() ?? null,
            });
        },
        { audited: false },
      );
    },
  };
}

export type OutboxStore = ReturnType<typeof outboxStore>;
