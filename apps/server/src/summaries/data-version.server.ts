import type Database from "better-sqlite3";
import type { Knex } from "knex";
import type { Change, ChangeListener } from "../store/core";

// The data version of a campaign: a counter in the table campaign_data_version, raised in the SAME transaction as
// every change to the campaign's samples, exclusions or withdrawals. Summaries are cached under the versions of
// their campaigns (summary-service.server.ts), so whoever can see a change committed reads the new version and
// can never be given a summary computed before it. Kept in SQLite, not in memory, because the ingest worker
// commits samples on its own connection: the version rises in that commit, not when the main thread hears of it.

/** Raises one campaign's version (inserting the row at 1 the first time). One statement, for any connection. */
export const BUMP_DATA_VERSION_SQL =
  "INSERT INTO campaign_data_version (campaign_id, version) VALUES (?, 1) ON CONFLICT (campaign_id) DO UPDATE SET version = version + 1";

/** Upload actions known to leave the samples as they are (recording a file, queueing a retry). Every other upload action raises the version. */
const UPLOAD_ACTIONS_WITHOUT_SAMPLE_CHANGE = new Set(["upload.create", "upload.retry"]);

function numberOrNull(value: unknown): number | null {
  return typeof value === "number" && Number.isInteger(value) ? value : null;
}

/**
 * Which campaign's summarised data a change alters, if any: an exclusion added or removed; any upload action
 * other than recording or re-queueing it (an ingest, a withdrawal, a restore, a re-read); or any change that says
 * so itself with `details.samplesChanged: true` and `details.campaignId`. An upload change without a campaignId
 * in its details is looked up in the same transaction.
 */
export async function campaignChangedBy(change: Change, trx: Knex.Transaction): Promise<number | null> {
  // Details are typed per action; this reads the two fields any change may carry.
  const details: Record<string, unknown> = { ...change.details };
  const campaignId = numberOrNull(details.campaignId);
  if (change.targetType === "exclusion") return campaignId;
  if (change.targetType === "upload" && !UPLOAD_ACTIONS_WITHOUT_SAMPLE_CHANGE.has(change.action)) {
    if (campaignId !== null) return campaignId;
    const row = await trx("upload").where({ id: Number(change.targetId) }).first<{ campaign_id: number } | undefined>("campaign_id");
    return row?.campaign_id ?? null;
  }
  if (details.samplesChanged === true) return campaignId;
  return null;
}

/** The store listener that raises the version inside each write's transaction (store.onChange). */
export function dataVersionListener(): ChangeListener {
  return {
    name: "summary data versions",
    async inTransaction(change, trx) {
      const campaignId = await campaignChangedBy(change, trx);
      if (campaignId !== null) await trx.raw(BUMP_DATA_VERSION_SQL, [campaignId]);
    },
  };
}

/** Prepared version queries by connection and number of campaigns (preparing costs more than the query itself). */
const versionStatements = new WeakMap<Database.Database, Map<number, Database.Statement>>();

function versionStatement(sqlite: Database.Database, count: number): Database.Statement {
  let byCount = versionStatements.get(sqlite);
  if (!byCount) {
    byCount = new Map();
    versionStatements.set(sqlite, byCount);
  }
  let statement = byCount.get(count);
  if (!statement) {
    statement = sqlite.prepare(`SELECT campaign_id AS id, version FROM campaign_data_version WHERE campaign_id IN (${Array.from({ length: count }, () => "?").join(",")})`);
    byCount.set(count, statement);
  }
  return statement;
}

/** The current versions of these campaigns, in the given order (0 for a campaign never changed). A plain WAL read: never waits for a writer. */
export function readDataVersions(sqlite: Database.Database, campaignIds: readonly number[]): number[] {
  if (campaignIds.length === 0) return [];
  const rows = versionStatement(sqlite, campaignIds.length).all(...campaignIds) as { id: number; version: number }[];
  const byId = new Map(rows.map((row) => [row.id, row.version]));
  return campaignIds.map((id) => byId.get(id) ?? 0);
}
