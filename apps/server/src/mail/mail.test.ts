import { createServer, type Server, type Socket } from "node:net";
import { afterAll, describe, expect, it } from "vitest";
import type { OutboxList } from "@calmcrest/contracts";
import { parseEnv } from "../env.server";
import { queueMail } from "../store/outbox";
import { createTestServer, signedInAgent } from "../test-support";
import { composeMail } from "./compose";
import { createMailTransport, type MailTransport, type OutgoingMail } from "./transport.server";
import type { AppContext } from "../context";
import { retryDelayMs } from "../store/outbox";

/** Queues one message in a write that audits like any change; `fail` rolls the write back after queueing. */
async function writeWithMail(context: AppContext, to: string, options: { fail?: boolean } = {}) {
  const parts = composeMail({ heading: `Hello ${to}`, paragraphs: ["A test message."], links: [{ label: "Open Calmcrest", url: "http://calmcrest.test/reports" }], footer: "You get this because it is a test." });
  return context.store.write(async ({ trx, audit }) => {
    // Any audited change will do; the audit vocabulary is fixed (packages/contracts/src/audit.ts).
    await audit({ userId: null, action: "user.mail-preferences", targetType: "user", targetId: to, details: { commentEmails: true } });
    await queueMail(trx, { kind: "invitation", to, subject: `Subject for ${to}`, ...parts });
    if (options.fail) throw new Error("the change failed after queueing its message");
  });
}

describe("the outbox with the default (local) transport", async () => {
  const { app, context } = await createTestServer();
  const admin = await signedInAgent(app, "admin");

  it("sends a message queued in a committed write, and lists it with both parts and its links", async () => {
    await writeWithMail(context, "first@calmcrest.test");
    await context.mail.idle();
    const response = await admin.get("/api/outbox");
    expect(response.status).toBe(200);
    const body = response.body as OutboxList;
    expect(body.transport).toBe("outbox");
    const message = body.messages.find((candidate) => candidate.to === "first@calmcrest.test");
    expect(message).toMatchObject({ kind: "invitation", subject: "Subject for first@calmcrest.test", status: "sent", attempts: 1, transport: "outbox", lastError: null });
    expect(message?.text).toContain("Open Calmcrest: http://calmcrest.test/reports");
    expect(message?.html).toContain('<a href="http://calmcrest.test/reports">Open Calmcrest</a>');
    expect(message?.links).toEqual([{ label: "Open Calmcrest", url: "http://calmcrest.test/reports" }]);
  });

  it("keeps no message of a write that rolled back (the message and its change commit together)", async () => {
    await expect(writeWithMail(context, "never@calmcrest.test", { fail: true })).rejects.toThrow("the change failed");
    expect(await context.store.outbox.list({ to: "never@calmcrest.test" })).toEqual([]);
  });

  it("is for administrators only", async () => {
    for (const role of ["lead", "engineer", "committee"] as const) {
      expect((await (await signedInAgent(app, role)).get("/api/outbox")).status).toBe(403);
    }
  });
});

describe("the mail sender when sending fails", async () => {
  let failuresLeft = 2;
  const sent: OutgoingMail[] = [];
  const flaky: MailTransport = {
    name: "smtp",
    send: async (message) => {
      if (failuresLeft > 0) {
        failuresLeft -= 1;
        throw new Error("421 mail.example.org busy, try later");
      }
      sent.push(message);
      return { messageId: "<test@calmcrest>" };
    },
    close: () => undefined,
  };
  const { context } = await createTestServer({ mailTransport: flaky });

  it("records each failed attempt and its error, retries later, and sends once the server answers", async () => {
    await writeWithMail(context, "retry@calmcrest.test");
    await context.mail.idle();
    const [afterFirst] = await context.store.outbox.list({ to: "retry@calmcrest.test" });
    expect(afterFirst).toMatchObject({ status: "retrying", attempts: 1, lastError: "421 mail.example.org busy, try later" });
    // The first retry waits the base delay (30 s by default).
    const waitMs = Date.parse(afterFirst?.nextAttemptAt ?? "") - Date.parse(afterFirst?.createdAt ?? "");
    expect(waitMs).toBeGreaterThanOrEqual(29_000);
    expect(waitMs).toBeLessThan(40_000);
    expect(sent).toEqual([]);
  });

  it("gives up after the last attempt and shows the message as failed", async () => {
    const sender = new (await import("./sender.server")).MailSender(context.store.outbox, { name: "smtp", send: () => Promise.reject(new Error("550 no such user")), close: () => undefined }, { from: "x@y.z", maxAttempts: 2, baseRetryDelayMs: 1 });
    await writeWithMail(context, "gone@calmcrest.test");
    await context.mail.idle();
    // Make it due now for this sender (the server's own sender left it for 30 s).
    await context.db.knex("outbox").where({ to_address: "gone@calmcrest.test" }).update({ next_attempt_at: new Date(0).toISOString(), attempts: 0, status: "queued" });
    sender.wake();
    await sender.idle();
    await new Promise((resolve) => setTimeout(resolve, 20));
    await sender.idle();
    const [message] = await context.store.outbox.list({ to: "gone@calmcrest.test" });
    expect(message).toMatchObject({ status: "failed", attempts: 2, lastError: "550 no such user", nextAttemptAt: null });
    await sender.stop();
  });
});

describe("a message left unsent by a stopped server", async () => {
  const failing: MailTransport = { name: "smtp", send: () => Promise.reject(new Error("connect ECONNREFUSED")), close: () => undefined };
  const first = await createTestServer({ mailTransport: failing });

  it("is sent by the next server on the same data at start-up", async () => {
    await writeWithMail(first.context, "later@calmcrest.test");
    await first.context.mail.idle();
    expect((await first.context.store.outbox.list({ to: "later@calmcrest.test" }))[0]).toMatchObject({ status: "retrying", attempts: 1 });
    // Due now, as if the server had been down past the retry time.
    await first.context.db.knex("outbox").where({ to_address: "later@calmcrest.test" }).update({ next_attempt_at: new Date(0).toISOString() });
    await first.context.close();
    const sent: OutgoingMail[] = [];
    const working: MailTransport = { name: "smtp", send: async (message) => (sent.push(message), { messageId: "<again@calmcrest>" }), close: () => undefined };
    const second = await createTestServer({ dataDir: first.dataDir, mailTransport: working });
    await second.context.mail.idle();
    expect(sent.map((message) => message.to)).toEqual(["later@calmcrest.test"]);
    expect((await second.context.store.outbox.list({ to: "later@calmcrest.test" }))[0]).toMatchObject({ status: "sent", attempts: 2, lastError: "connect ECONNREFUSED" });
  });
});

describe("retry delays", () => {
  it("double from the base and stop at the cap", () => {
    expect([1, 2, 3, 4, 9].map((attempts) => retryDelayMs(attempts, 30_000, 3_600_000))).toEqual([30_000, 60_000, 120_000, 240_000, 3_600_000]);
  });
});

/** A minimal SMTP server (RFC 5321 happy path) that refuses the first message with a temporary 451 and keeps the rest. */
function fakeSmtpServer(): Promise<{ server: Server; port: number; received: string[] }> {
  const received: string[] = [];
  let refusedOnce = false;
  const server = createServer((socket: Socket) => {
    let buffer = "";
    let inData = false;
    let data = "";
    socket.write("220 fake.smtp.test ESMTP\r\n");
    socket.on("data", (chunk) => {
      buffer += chunk.toString("utf8");
      let end: number;
      while ((end = buffer.indexOf("\r\n")) >= 0) {
        const line = buffer.slice(0, end);
        buffer = buffer.slice(end + 2);
        if (inData) {
          if (line === ".") {
            inData = false;
            if (!refusedOnce) {
              refusedOnce = true;
              socket.write("451 4.3.0 temporary failure, try again\r\n");
            } else {
              received.push(data);
              socket.write("250 2.0.0 queued\r\n");
            }
            data = "";
          } else data += `${line}\n`;
          continue;
        }
        const verb = line.slice(0, 4).toUpperCase();
        if (verb === "EHLO" || verb === "HELO") socket.write("250-fake.smtp.test\r\n250 8BITMIME\r\n");
        else if (verb === "DATA") {
          inData = true;
          socket.write("354 go ahead\r\n");
        } else if (verb === "QUIT") {
          socket.write("221 bye\r\n");
          socket.end();
        } else socket.write("250 OK\r\n");
      }
    });
  });
  return new Promise((resolve) => server.listen(0, "127.0.0.1", () => {
    const address = server.address();
    resolve({ server, port: typeof address === "object" && address ? address.port : 0, received });
  }));
}

describe("the SMTP transport (CALMCREST_SMTP_URL)", async () => {
  const smtp = await fakeSmtpServer();
  afterAll(() => new Promise<void>((resolve) => smtp.server.close(() => resolve())));

  it("is chosen by configuration, and a bad address stops the server naming the variable", () => {
    expect(parseEnv({ CALMCREST_SMTP_URL: `smtp://127.0.0.1:${smtp.port}` }).mailTransport).toBe("smtp");
    expect(parseEnv({}).mailTransport).toBe("outbox");
    expect(() => parseEnv({ CALMCREST_SMTP_URL: "mail.example.org" })).toThrow(/CALMCREST_SMTP_URL must be an SMTP address/);
  });

  it("delivers through a real SMTP conversation, after a temporary refusal is retried", async () => {
    const { context } = await createTestServer({ env: { CALMCREST_SMTP_URL: `smtp://127.0.0.1:${smtp.port}` } });
    await writeWithMail(context, "smtp@calmcrest.test");
    await context.mail.idle();
    const [refused] = await context.store.outbox.list({ to: "smtp@calmcrest.test" });
    expect(refused).toMatchObject({ status: "retrying", attempts: 1, transport: "smtp" });
    expect(refused?.lastError).toContain("451");
    // Bring the retry forward instead of waiting 30 s.
    await context.db.knex("outbox").where({ id: refused?.id }).update({ next_attempt_at: new Date(0).toISOString() });
    context.mail.wake();
    await context.mail.idle();
    const [sent] = await context.store.outbox.list({ to: "smtp@calmcrest.test" });
    expect(sent).toMatchObject({ status: "sent", attempts: 2, transport: "smtp" });
    expect(smtp.received).toHaveLength(1);
    expect(smtp.received[0]).toContain("Subject: Subject for smtp@calmcrest.test");
    expect(smtp.received[0]).toContain("Content-Type: text/html");
    expect(createMailTransport({ CALMCREST_SMTP_URL: undefined }).name).toBe("outbox");
  });
});
