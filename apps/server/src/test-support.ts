import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Database from "better-sqlite3";
import request from "supertest";
import type { Express } from "express";
import { afterAll } from "vitest";
import { createApp } from "./app";
import { hashPassword } from "./auth/passwords.server";
import type { AppContext } from "./context";
import { parseEnv } from "./env.server";
import type { MailTransport } from "./mail/transport.server";
import { createContext } from "./server";
import { SummaryService } from "./summaries/summary-service.server";

export const DEMO_PASSWORD_FOR_TESTS = "test-password-1";
/** The public address test servers are configured with (CALMCREST_PUBLIC_URL). */
export const TEST_PUBLIC_URL = "http://calmcrest.test";
/** Headers of a request made by a Calmcrest page served from this server: pass to `.set()` on every POST/PATCH/DELETE. */
export const SAME_ORIGIN = { Origin: TEST_PUBLIC_URL, Host: "calmcrest.test" } as const;

/**
 * A fresh server on a fresh temporary data directory, with the demo users (and, if asked, the demo scenario).
 * Removed after the test file. Never touches ./data.
 */
export async function createTestServer(
  options: {
    /** null leaves CALMCREST_SEED unset (the default rule by HOST). */
    seed?: "users" | "full" | "none" | null;
    /** null leaves CALMCREST_PUBLIC_URL unset (the local default); otherwise TEST_PUBLIC_URL unless given. */
    publicUrl?: string | null;
    env?: Record<string, string>;
    dataDir?: string;
    /** A transport in place of the configured one (e.g. one that fails, to test retries). */
    mailTransport?: MailTransport;
  } = {},
) {
  // A given dataDir reopens an existing data directory (a restart); its first owner removes it.
  const ownsDataDir = options.dataDir === undefined;
  const dataDir = options.dataDir ?? mkdtempSync(join(tmpdir(), "calmcrest-test-"));
  const env = parseEnv({
    NODE_ENV: "test",
    CALMCREST_DATA_DIR: dataDir,
    DEMO_PASSWORD: DEMO_PASSWORD_FOR_TESTS,
    ...(options.seed === null ? {} : { CALMCREST_SEED: options.seed ?? "users" }),
    ...(options.publicUrl === null ? {} : { CALMCREST_PUBLIC_URL: options.publicUrl ?? TEST_PUBLIC_URL }),
    // Every supertest request comes from the same address: only the tests of the limit itself keep it low.
    CALMCREST_SIGNIN_MAX_FAILURES_PER_ADDRESS: "1000",
    ...options.env,
  });
  const context: AppContext = await createContext(env, options.mailTransport ? { mailTransport: options.mailTransport } : {});
  const app: Express = createApp(context);
  afterAll(async () => {
    await context.close();
    if (ownsDataDir) rmSync(dataDir, { recursive: true, force: true });
  });
  return { app, context, dataDir };
}

/** A supertest agent signed in as the demo user with that role; state-changing calls carry the right Origin. */
export async function signedInAgent(app: Express, role: "admin" | "lead" | "engineer" | "committee") {
  const agent = request.agent(app);
  const response = await agent
    .post("/api/auth/sign-in")
    .set(SAME_ORIGIN)
    .send({ email: `${role}@calmcrest.test`, password: DEMO_PASSWORD_FOR_TESTS });
  if (response.status !== 200) throw new Error(`sign-in as ${role} failed: ${response.status} ${JSON.stringify(response.body)}`);
  return agent;
}

// Looks into the database for tests, at what the API does not show (stored sample counts, raw rows). Routes and
// their tests go through the API and the store; only these helpers read tables directly.

/** A summary service of its own over the test server's database, with `workers` worker threads; close it after use. */
export function separateSummaryService(context: AppContext, workers: number): SummaryService {
  return new SummaryService({ dbFile: context.db.file, sqlite: context.db.sqlite, workers });
}

/** Rows of a table matching `where`, in insertion order. */
export async function tableRows(context: AppContext, table: string, where: Record<string, unknown> = {}): Promise<Record<string, unknown>[]> {
  return context.db.knex(table).where(where).select<Record<string, unknown>[]>("*");
}

/** How many rows of a table match `where`. */
export async function countRows(context: AppContext, table: string, where: Record<string, unknown> = {}): Promise<number> {
  const row = await context.db.knex(table).where(where).count<{ n: number }[]>({ n: "*" }).first();
  return Number(row?.n ?? 0);
}

/** Sets `values` on the rows of a table matching `where` (to age a row past a limit, say); resolves to the number changed. */
export async function updateRows(context: AppContext, table: string, where: Record<string, unknown>, values: Record<string, unknown>): Promise<number> {
  return context.db.knex(table).where(where).update(values);
}

/** Deletes the rows of a table matching `where`; resolves to the number deleted. */
export async function deleteRows(context: AppContext, table: string, where: Record<string, unknown> = {}): Promise<number> {
  return context.db.knex(table).where(where).delete();
}

/** The sha256 of every finished upload of the sites' campaigns (what a frozen report version must list). */
export async function finishedUploadHashes(context: AppContext, siteIds: readonly number[]): Promise<string[]> {
  const rows = await context.db
    .knex("upload")
    .join("campaign", "campaign.id", "upload.campaign_id")
    .whereIn("campaign.site_id", siteIds)
    .where("upload.status", "done")
    .select<{ sha256: string }[]>("upload.sha256");
  return rows.map((row) => row.sha256);
}

/**
 * Makes every insert into a table fail with `message` (a full disk, a broken table) until the returned function is
 * awaited: for tests that a change and the rows it writes elsewhere commit or roll back together.
 */
export async function refuseInsertsInto(context: AppContext, table: string, message: string): Promise<() => Promise<void>> {
  if (!/^[a-z_]+$/.test(table)) throw new Error(`refuseInsertsInto: "${table}" is not a plain table name.`);
  const trigger = `${table}_refuses_inserts_in_test`;
  const quoted = `'${message.replaceAll("'", "''")}'`;
  await context.db.knex.raw(`CREATE TRIGGER ${trigger} BEFORE INSERT ON ${table} BEGIN SELECT RAISE(ABORT, ${quoted}); END`);
  return async () => {
    await context.db.knex.raw(`DROP TRIGGER ${trigger}`);
  };
}

/**
 * An active account with a password, made through the store as `npm run create-admin` does (people join by
 * invitation in the app; tests that need a ready account use this). Returns its id.
 */
export async function createAccount(context: AppContext, input: { email: string; name: string; role: "admin" | "lead" | "engineer" | "committee"; password: string }): Promise<string> {
  return context.store.users.create(null, { email: input.email.toLowerCase(), name: input.name, role: input.role }, await hashPassword(input.password));
}

/** The id of the account with that e-mail (the demo users exist in every test server). */
export async function userIdOf(context: AppContext, email: string): Promise<string> {
  const id = await context.store.users.idByEmail(email);
  if (!id) throw new Error(`No account has the e-mail ${email}.`);
  return id;
}

/** The audit actions recorded for an item (or for every item of a type), oldest first. */
export function auditActions(context: AppContext, targetType: string, targetId?: string | number): Promise<string[]> {
  return context.store.audit.actions(targetType, targetId);
}

/** Resolves once the ingest worker holds SQLite's write lock: a probe connection that does not wait gets SQLITE_BUSY. */
export async function ingestHoldsWriteLock(context: AppContext): Promise<void> {
  const probe = new Database(context.db.file);
  probe.pragma("busy_timeout = 0");
  try {
    for (;;) {
      try {
        probe.exec("BEGIN IMMEDIATE");
        probe.exec("ROLLBACK");
      } catch (error) {
        if (error instanceof Error && "code" in error && error.code === "SQLITE_BUSY") return;
        throw error;
      }
      await new Promise((resolve) => setTimeout(resolve, 10));
    }
  } finally {
    probe.close();
  }
}

/** Takes SQLite's write lock on a connection that does not wait, and gives it back; throws SQLITE_BUSY if anyone holds it. */
export function takeWriteLockWithoutWaiting(context: AppContext): void {
  const probe = new Database(context.db.file);
  probe.pragma("busy_timeout = 0");
  try {
    probe.exec("BEGIN IMMEDIATE");
    probe.exec("ROLLBACK");
  } finally {
    probe.close();
  }
}

/**
 * Leaves the database as a process killed mid-ingest would: the upload marked ingesting, and one sample written
 * in a transaction that never commits (closing the connection without COMMIT rolls it back).
 */
export function simulateDeadIngest(context: AppContext, uploadId: number, campaignId: number): void {
  const raw = new Database(context.db.file);
  raw.prepare("UPDATE upload SET status = 'ingesting' WHERE id = ?").run(uploadId);
  raw.exec("BEGIN IMMEDIATE");
  raw
    .prepare("INSERT INTO sample (campaign_id, time_ms, upload_id, seeing_arcsec, r0_cm, zenith_deg, anisotropic) VALUES (?, ?, ?, 0.8, 12, 20, 0)")
    .run(campaignId, Date.parse("2025-04-08T03:00:00Z"), uploadId);
  raw.close();
}
