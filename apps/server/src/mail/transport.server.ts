import nodemailer from "nodemailer";
import type { Env } from "../env.server";

/** What the mail sender needs of a transport: send one message, and close. */
export interface MailTransport {
  /** `outbox`: the message is composed (MIME, by nodemailer) and kept in the local outbox only; `smtp`: sent to a server. */
  readonly name: "outbox" | "smtp";
  send(message: OutgoingMail): Promise<{ messageId: string | null }>;
  close(): void;
}

export interface OutgoingMail {
  from: string;
  to: string;
  subject: string;
  text: string;
  html: string;
}

/**
 * The transport chosen by configuration: CALMCREST_SMTP_URL set, SMTP through nodemailer; unset, the local outbox
 * transport. That one still runs every message through nodemailer's composer (so a message that could not be
 * built fails here as it would over SMTP) but delivers it nowhere: the outbox row is the delivery, read on the
 * admin Outbox page.
 */
export function createMailTransport(env: Pick<Env, "CALMCREST_SMTP_URL">): MailTransport {
  if (env.CALMCREST_SMTP_URL) {
    const smtp = nodemailer.createTransport(env.CALMCREST_SMTP_URL);
    return {
      name: "smtp",
      async send(message) {
        const info = await smtp.sendMail(message);
        return { messageId: info.messageId || null };
      },
      close: () => smtp.close(),
    };
  }
  const local = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: "unix" });
  return {
    name: "outbox",
    async send(message) {
      const info = await local.sendMail(message);
      return { messageId: info.messageId || null };
    },
    close: () => local.close(),
  };
}
