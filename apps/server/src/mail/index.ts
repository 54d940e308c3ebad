import type { Env } from "../env.server";
import type { Store } from "../store/index";
import { MailSender, type MailSenderOptions } from "./sender.server";
import { createMailTransport, type MailTransport } from "./transport.server";

// E-mail: messages are queued in the outbox inside the transaction of the change they report (`queueMail`,
// store/outbox.ts) and sent after it commits by the MailSender, through the transport the configuration chose.
export { composeMail, escapeHtml, type MailPieces } from "./compose";
export { MailSender } from "./sender.server";
export { createMailTransport, type MailTransport, type OutgoingMail } from "./transport.server";

/**
 * The server's mail sender: the configured transport (or `transport` in tests), woken after every committed
 * change, since a change may have queued a message, and once at start for messages a stopped server left unsent.
 */
export function startMail(env: Pick<Env, "CALMCREST_SMTP_URL" | "CALMCREST_MAIL_FROM">, store: Store, options: { transport?: MailTransport } & Partial<MailSenderOptions> = {}): MailSender {
  const { transport, ...senderOptions } = options;
  const sender = new MailSender(store.outbox, transport ?? createMailTransport(env), { from: env.CALMCREST_MAIL_FROM, ...senderOptions });
  store.onChange({ name: "mail-sender", afterCommit: () => sender.wake() });
  sender.wake();
  return sender;
}
