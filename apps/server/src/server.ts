import type { Server } from "node:http";
import { createApp } from "./app";
import { createLucia } from "./auth/lucia.server";
import { prepareSignInCheck } from "./auth/passwords.server";
import { SessionAdapter } from "./auth/session-adapter.server";
import { SignInGuard } from "./auth/sign-in-guard.server";
import type { AppContext } from "./context";
import { openDatabase } from "./db/database.server";
import type { Env } from "./env.server";
import { IngestQueue, recoverUploads } from "./ingest/ingest-queue.server";
import { startMail } from "./mail/index";
import type { MailTransport } from "./mail/transport.server";
import { cleanLeftovers, describeLeftovers } from "./uploads/leftovers.server";
import { seedIfEmpty, warnAboutReachableDemo } from "./seed/index";
import { createStore, WriteGate } from "./store/index";
import { SampleCache } from "./summaries/sample-cache.server";
import { dataVersionListener } from "./summaries/data-version.server";
import { SummaryService } from "./summaries/summary-service.server";

// Start-up hooks other areas register (for example: mark uploads left half-done by a dead process).
export const startupSteps: ((context: AppContext) => Promise<void>)[] = [
  async ({ store, env }) => {
    const cleaned = describeLeftovers(await cleanLeftovers(store, env.dataDir));
    if (cleaned) console.log(cleaned);
  },
  async ({ store, ingest }) => {
    const { interrupted, requeued } = await recoverUploads(store, ingest);
    if (interrupted + requeued > 0) {
      console.log(`Calmcrest: ${interrupted} upload(s) left half-ingested by a stopped server are marked interrupted; ${requeued} queued upload(s) re-queued.`);
    }
  },
];

/** Opens the database (migrating it), seeds an empty one, and returns the context the app runs on. */
export async function createContext(env: Env, options: { mailTransport?: MailTransport } = {}): Promise<AppContext> {
  const db = await openDatabase(env.dataDir);
  const samples = new SampleCache(db.sqlite);
  const gate = new WriteGate();
  const store = createStore(db, samples, gate, {
    publicBaseUrl: env.publicBaseUrl,
    linkLifetimes: { invitationMs: env.CALMCREST_INVITATION_TTL_S * 1000, resetMs: env.CALMCREST_RESET_TTL_S * 1000 },
  });
  // Every change to a campaign's samples, exclusions or withdrawals raises its data version in the same transaction.
  store.onChange(dataVersionListener());
  const summaries = new SummaryService({ dbFile: db.file, sqlite: db.sqlite, columnCacheMaxBytes: env.CALMCREST_SAMPLE_CACHE_MB * 1024 * 1024 });
  let closing: Promise<void> | undefined;
  const ingest = new IngestQueue(store, gate, { dbFile: db.file, dataDir: env.dataDir, allowTestHooks: env.NODE_ENV === "test" });
  // Session writes never wait on the main thread for an ingest's write lock; deferred ones land through the write gate.
  const sessionStore = new SessionAdapter(db.file, (write) => gate.withSlot(write));
  const mail = startMail(env, store, options.mailTransport ? { transport: options.mailTransport } : {});
  const lucia = createLucia(sessionStore, { secureCookies: env.NODE_ENV === "production" });
  const signInGuard = new SignInGuard({
    maxFailuresPerAccount: env.CALMCREST_SIGNIN_MAX_FAILURES,
    maxFailuresPerAddress: env.CALMCREST_SIGNIN_MAX_FAILURES_PER_ADDRESS,
    windowMs: env.CALMCREST_SIGNIN_WINDOW_S * 1000,
  }, Date.now, () => sessionStore.settled());
  const context: AppContext = {
    env,
    db,
    lucia,
    sessionStore,
    signInGuard,
    store,
    ingest,
    samples,
    mail,
    summaries,
    close: () => {
      // Idempotent: a test may close a context early (a simulated restart) and again in afterAll.
      closing ??= signInGuard.settled().then(() => Promise.all([ingest.stop(), mail.stop(), summaries.close()])).then(() => {
        sessionStore.close();
        return db.close();
      });
      return closing;
    },
  };
  for (const step of startupSteps) await step(context);
  await prepareSignInCheck();
  await seedIfEmpty(context);
  await warnAboutReachableDemo(context);
  return context;
}

export function listen(context: AppContext): Promise<Server> {
  const app = createApp(context);
  return new Promise((resolve, reject) => {
    const server = app.listen(context.env.PORT, context.env.HOST, () => resolve(server));
    server.on("error", reject);
  });
}
