import type Database from "better-sqlite3";
import type { AuditEntry } from "@calmcrest/contracts";
import type { UploadStatusName } from "@calmcrest/contracts";
import { BUMP_DATA_VERSION_SQL } from "../summaries/data-version.server";

// The writes that move an upload's samples between `sample` and `withdrawn_sample` (withdraw, restore, re-read).
// A large upload holds a million samples, and moving them takes seconds of SQLite work, so these writes never run
// on the main thread: the ingest worker runs them on its own connection (IngestQueue.moveSamples), holding the
// write gate like an ingest's commit, while the main thread goes on answering. Each runs in ONE transaction with
// its audit rows and the campaign's data version, all or nothing, exactly as a store.write would; the main thread
// then runs the after-commit effects (StoreCore.committedElsewhere). Synchronous on purpose: one better-sqlite3
// connection, no Knex, so the worker can run them.

/** The sample columns, in the order both sample tables are copied with. */
export const SAMPLE_COLUMNS =
  "campaign_id, time_ms, upload_id, seeing_arcsec, r0_cm, zenith_deg, seeing_long_arcsec, seeing_trans_arcsec, anisotropic, sun_alt_deg, flux, scint_index, tau0_ms, theta0_arcsec, wind_ms, rh_pct";

/** Statuses an upload may be withdrawn, restored or re-read from (not while it is queued or being read). */
export const SETTLED_STATUSES: readonly UploadStatusName[] = ["done", "failed", "interrupted"];

export type SampleMoveJob =
  | { kind: "withdraw"; uploadId: number; campaignId: number; actorId: string; reason: string }
  | { kind: "restore"; uploadId: number; campaignId: number; actorId: string; reason: string | null }
  | {
      kind: "reread";
      uploadId: number;
      campaignId: number;
      actorId: string;
      reason: string;
      /** The new upload's row as the main thread prepared it (status queued, replaces_upload_id = uploadId). */
      newUpload: {
        file_name: string;
        size_bytes: number;
        sha256: string;
        mapping: string;
        monitor_override: string | null;
        read_options: string | null;
      };
      /** For the audit row: the mapping and the corrected monitor asked for. */
      mapping: unknown;
      monitor: unknown;
    };

/** What a move did: committed with these audit entries (and, for a re-read, the new upload's id), or refused with nothing changed. */
export type SampleMoveOutcome =
  | { ok: true; changes: (AuditEntry & { at: string })[]; newUploadId: number | null }
  | { ok: false; status: number; code: string; message: string };

/** Thrown inside the transaction to roll it back with an answer for the person (turned into an HttpError on the main thread). */
class Refusal extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/** The writer of one move transaction: its audit rows, in the same transaction, as StoreCore.write writes them. */
function auditWriter(db: Database.Database) {
  const insert = db.prepare("INSERT INTO audit_log (at, user_id, action, target_type, target_id, details) VALUES (?, ?, ?, ?, ?, ?)");
  const changes: (AuditEntry & { at: string })[] = [];
  return {
    changes,
    audit(entry: AuditEntry, at: string): void {
      insert.run(at, entry.userId, entry.action, entry.targetType, String(entry.targetId), JSON.stringify(entry.details));
      changes.push({ ...entry, at });
    },
  };
}

function uploadState(db: Database.Database, uploadId: number) {
  return db.prepare("SELECT status, withdrawn_at, withdrawn_reason FROM upload WHERE id = ?").get(uploadId) as
    | { status: UploadStatusName; withdrawn_at: string | null; withdrawn_reason: string | null }
    | undefined;
}

function requireSettled(status: UploadStatusName, verb: string): void {
  if (!SETTLED_STATUSES.includes(status)) {
    throw new Refusal(409, "upload_busy", `This upload is ${status}; it can be ${verb} once its reading has finished. Wait a moment and try again.`);
  }
}

const NOT_FOUND = () => new Refusal(404, "not_found", "That upload does not exist, or your account has no access to it.");

/** Moves the upload's samples out of every statistic (into withdrawn_sample) and marks it withdrawn; inside the transaction. */
function withdrawIn(db: Database.Database, job: { uploadId: number; campaignId: number; actorId: string }, reason: string, at: string): number {
  db.prepare(`INSERT INTO withdrawn_sample (${SAMPLE_COLUMNS}) SELECT ${SAMPLE_COLUMNS} FROM sample WHERE campaign_id = ? AND upload_id = ?`).run(job.campaignId, job.uploadId);
  const moved = db.prepare("DELETE FROM sample WHERE campaign_id = ? AND upload_id = ?").run(job.campaignId, job.uploadId).changes;
  db.prepare("UPDATE upload SET withdrawn_at = ?, withdrawn_by = ?, withdrawn_reason = ? WHERE id = ?").run(at, job.actorId, reason, job.uploadId);
  return moved;
}

function withdraw(db: Database.Database, job: Extract<SampleMoveJob, { kind: "withdraw" }>, audit: (entry: AuditEntry, at: string) => void): null {
  const current = uploadState(db, job.uploadId);
  if (!current) throw NOT_FOUND();
  if (current.withdrawn_at !== null) throw new Refusal(409, "already_withdrawn", "This upload is withdrawn already. Restore it if its samples should count again.");
  requireSettled(current.status, "withdrawn");
  const at = new Date().toISOString();
  const moved = withdrawIn(db, job, job.reason, at);
  audit({ userId: job.actorId, action: "upload.withdraw", targetType: "upload", targetId: job.uploadId, details: { campaignId: job.campaignId, reason: job.reason, samples: moved } }, at);
  return null;
}

function restore(db: Database.Database, job: Extract<SampleMoveJob, { kind: "restore" }>, audit: (entry: AuditEntry, at: string) => void): null {
  const current = uploadState(db, job.uploadId);
  if (!current) throw NOT_FOUND();
  if (current.withdrawn_at === null) throw new Refusal(409, "not_withdrawn", "This upload is not withdrawn; its samples already count.");
  const holders = db
    .prepare(
      `SELECT u.id AS id, u.file_name AS file_name, COUNT(*) AS n FROM withdrawn_sample AS w
       JOIN sample AS s ON s.campaign_id = w.campaign_id AND s.time_ms = w.time_ms
       JOIN upload AS u ON u.id = s.upload_id
       WHERE w.upload_id = ? GROUP BY u.id, u.file_name`,
    )
    .all(job.uploadId) as { id: number; file_name: string; n: number }[];
  if (holders.length > 0) {
    const named = holders.map((holder) => `upload #${holder.id} (${holder.file_name}, ${holder.n} ${holder.n === 1 ? "time" : "times"})`).join(", ");
    throw new Refusal(
      409,
      "times_taken",
      `This upload cannot be restored: ${named} now ${holders.length === 1 ? "holds" : "hold"} samples at the same times. Withdraw ${holders.length === 1 ? "it" : "them"} first, then restore this one.`,
    );
  }
  db.prepare(`INSERT INTO sample (${SAMPLE_COLUMNS}) SELECT ${SAMPLE_COLUMNS} FROM withdrawn_sample WHERE upload_id = ?`).run(job.uploadId);
  const moved = db.prepare("DELETE FROM withdrawn_sample WHERE upload_id = ?").run(job.uploadId).changes;
  db.prepare("UPDATE upload SET withdrawn_at = NULL, withdrawn_by = NULL, withdrawn_reason = NULL WHERE id = ?").run(job.uploadId);
  audit(
    {
      userId: job.actorId,
      action: "upload.restore",
      targetType: "upload",
      targetId: job.uploadId,
      details: { campaignId: job.campaignId, reason: job.reason, samples: moved, withdrawnAt: current.withdrawn_at, withdrawnReason: current.withdrawn_reason },
    },
    new Date().toISOString(),
  );
  return null;
}

function reread(db: Database.Database, job: Extract<SampleMoveJob, { kind: "reread" }>, audit: (entry: AuditEntry, at: string) => void): number {
  const current = uploadState(db, job.uploadId);
  if (!current) throw NOT_FOUND();
  requireSettled(current.status, "re-read");
  const newer = db.prepare("SELECT id FROM upload WHERE replaces_upload_id = ? AND withdrawn_at IS NULL LIMIT 1").get(job.uploadId) as { id: number } | undefined;
  if (newer) throw new Refusal(409, "already_reread", `This upload was re-read already as upload #${newer.id}; re-read that one instead.`);
  const now = new Date().toISOString();
  const row = job.newUpload;
  const inserted = db
    .prepare(
      `INSERT INTO upload (campaign_id, file_name, size_bytes, sha256, uploaded_by, uploaded_at, mapping, status, replaces_upload_id, monitor_override, read_options)
       VALUES (?, ?, ?, ?, ?, ?, ?, 'queued', ?, ?, ?)`,
    )
    .run(job.campaignId, row.file_name, row.size_bytes, row.sha256, job.actorId, now, row.mapping, job.uploadId, row.monitor_override, row.read_options);
  const newId = Number(inserted.lastInsertRowid);
  if (current.withdrawn_at === null) {
    const moved = withdrawIn(db, job, `Replaced by re-read #${newId}: ${job.reason}`, now);
    audit(
      { userId: job.actorId, action: "upload.withdraw", targetType: "upload", targetId: job.uploadId, details: { campaignId: job.campaignId, reason: job.reason, samples: moved, replacedBy: newId } },
      now,
    );
  }
  audit(
    {
      userId: job.actorId,
      action: "upload.reread",
      targetType: "upload",
      targetId: newId,
      details: { campaignId: job.campaignId, replaces: job.uploadId, reason: job.reason, mapping: job.mapping, monitor: job.monitor },
    },
    now,
  );
  return newId;
}

/**
 * Runs one move in one write transaction on `db` (BEGIN IMMEDIATE … COMMIT): the checks, the samples, the upload
 * row, the audit rows and the campaign's data version. A refusal (409 and the like) rolls back and changes nothing.
 * Only call while holding the write gate exclusively (no main-thread write may be open meanwhile).
 */
export function runSampleMove(db: Database.Database, job: SampleMoveJob): SampleMoveOutcome {
  const writer = auditWriter(db);
  db.exec("BEGIN IMMEDIATE");
  try {
    let newUploadId: number | null = null;
    if (job.kind === "withdraw") withdraw(db, job, writer.audit);
    else if (job.kind === "restore") restore(db, job, writer.audit);
    else newUploadId = reread(db, job, writer.audit);
    // Every one of these changes the campaign's samples: its cached summaries lapse (see data-version.server.ts).
    db.prepare(BUMP_DATA_VERSION_SQL).run(job.campaignId);
    db.exec("COMMIT");
    return { ok: true, changes: writer.changes, newUploadId };
  } catch (error) {
    if (db.inTransaction) db.exec("ROLLBACK");
    if (error instanceof Refusal) return { ok: false, status: error.status, code: error.code, message: error.message };
    throw error;
  }
}
