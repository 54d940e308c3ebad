// The outbox: every e-mail Calmcrest writes, stored with the change it reports (see apps/server/src/mail).

/**
 * Kinds of message. Reports: a version published, a new comment (to the report's lead), a reply (to the thread's
 * participants), a thread resolved (to its participants). Accounts: an invitation, a password reset.
 */
export const MAIL_KINDS = ["report_published", "comment_new", "comment_reply", "thread_resolved", "invitation", "password_reset"] as const;
export type MailKind = (typeof MAIL_KINDS)[number];

export const MAIL_KIND_LABELS: Record<MailKind, string> = {
  report_published: "Report version published",
  comment_new: "New comment",
  comment_reply: "Reply in a thread",
  thread_resolved: "Thread resolved",
  invitation: "Invitation",
  password_reset: "Password reset",
};

/**
 * Where a message stands. `queued`: written, not yet handed to the transport; `retrying`: a send failed and is
 * tried again at `nextAttemptAt`; `sent`: the transport took it; `failed`: it kept failing and Calmcrest gave up.
 */
export const OUTBOX_STATUSES = ["queued", "retrying", "sent", "failed"] as const;
export type OutboxStatus = (typeof OUTBOX_STATUSES)[number];

/** A link a message carries (absolute address, so it works from any mail program). */
export interface MailLink {
  label: string;
  url: string;
}

/** One message of `GET /api/outbox` (administrators), newest first. */
export interface OutboxMessage {
  id: number;
  kind: MailKind;
  to: string;
  subject: string;
  /** The plain-text part, exactly as sent. */
  text: string;
  /** The HTML part, exactly as sent (built from sanitised Markdown; no script, no inline style). */
  html: string;
  links: MailLink[];
  status: OutboxStatus;
  /** How many times a send was tried. */
  attempts: number;
  /** The last transport error, when a send failed. */
  lastError: string | null;
  createdAt: string;
  /** When the next try is due (queued or retrying), else null. */
  nextAttemptAt: string | null;
  sentAt: string | null;
  /** The transport that sent it: `outbox` (kept here only, the default) or `smtp`. */
  transport: "outbox" | "smtp" | null;
}

/** `GET /api/outbox`. */
export interface OutboxList {
  /** How this server delivers mail: `outbox` keeps messages here only; `smtp` sends them through CALMCREST_SMTP_URL. */
  transport: "outbox" | "smtp";
  messages: OutboxMessage[];
}
