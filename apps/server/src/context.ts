import type { AppDatabase } from "./db/database.server";
import type { AppLucia } from "./auth/lucia.server";
import type { SessionAdapter } from "./auth/session-adapter.server";
import type { SignInGuard } from "./auth/sign-in-guard.server";
import type { Env } from "./env.server";
import type { IngestQueue } from "./ingest/ingest-queue.server";
import type { MailSender } from "./mail/sender.server";
import type { Store } from "./store/index";
import type { SampleCache } from "./summaries/sample-cache.server";
import type { SummaryService } from "./summaries/summary-service.server";

/** What every route module receives. */
export interface AppContext {
  env: Env;
  db: AppDatabase;
  lucia: AppLucia;
  /** Lucia's session storage (deferred writes while an ingest holds the write lock). */
  sessionStore: SessionAdapter;
  /** Sign-in rate limits and the sign-in audit writes still landing. */
  signInGuard: SignInGuard;
  /** Every query and write of the application tables (routes -> store -> engine). */
  store: Store;
  /** Background ingest of stored uploads, one at a time. */
  ingest: IngestQueue;
  /** Per-campaign sample columns for summaries, loaded from SQLite on first use. */
  samples: SampleCache;
  /** Sends the outbox's messages after their transaction commits (store.outbox, queueMail). */
  mail: MailSender;
  /**
   * Summaries, site-list briefs and sample series: cached by data version, computed off the main thread. Other
   * computations over samples (a comparison) register a task in summaries/tasks.server.ts and call compute().
   */
  summaries: SummaryService;
  /** Stops the ingest worker and closes the database. */
  close(): Promise<void>;
}
