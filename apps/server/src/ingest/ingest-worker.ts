import { createReadStream } from "node:fs";
import { parentPort } from "node:worker_threads";
import Database from "better-sqlite3";
import { describeLogFormatError, exactMapping, LogFormatError } from "@calmcrest/seeing-stats";
import { streamLog } from "@calmcrest/seeing-stats/node";
import { tune } from "../db/tune.server";
import { BUMP_DATA_VERSION_SQL } from "../summaries/data-version.server";
import type { FromWorker, IngestJob, ToWorker } from "./ingest-protocol";

// Runs in a worker thread so the HTTP server stays responsive while a large file is parsed and written, and so
// the write transaction can wait on SQLite's busy handler without blocking the main thread's event loop.

const PROGRESS_EVERY_MS = 100;
let connection: Database.Database | null = null;
let connectionFile = "";

function open(file: string): Database.Database {
  if (connection && connectionFile === file) return connection;
  connection?.close();
  connection = new Database(file);
  tune(connection);
  connectionFile = file;
  return connection;
}

function post(message: FromWorker): void {
  parentPort?.postMessage(message);
}

/** Describes a failure for the person who uploaded the file. */
function describe(error: unknown): string {
  if (error instanceof LogFormatError) return describeLogFormatError(error).text;
  if (error instanceof Error) return error.message;
  return String(error);
}

/**
 * Streams the stored raw file through the engine and writes every sample and every rejected row in ONE
 * transaction, together with the upload's final counts: either all of it is committed or none of it.
 */
async function ingest(job: IngestJob): Promise<void> {
  const db = open(job.dbFile);
  const insertSample = db.prepare(
    `INSERT OR IGNORE INTO sample (campaign_id, time_ms, upload_id, seeing_arcsec, r0_cm, zenith_deg, seeing_long_arcsec,
       seeing_trans_arcsec, anisotropic, sun_alt_deg, flux, scint_index, tau0_ms, theta0_arcsec, wind_ms, rh_pct)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const insertReject = db.prepare("INSERT INTO upload_reject (upload_id, line, reason, message, raw_line) VALUES (?, ?, ?, ?, ?)");
  const finish = db.prepare(
    `UPDATE upload SET status = 'done', rows_read = ?, samples_accepted = ?, rejected_by_reason = ?, mapping = ?, error = NULL, finished_at = ?
     WHERE id = ?`,
  );
  const rejectedByReason: Record<string, number> = {};
  let accepted = 0;
  let lastProgressMs = 0;
  const { uploadId, campaignId } = job;

  const reject = (line: number, reason: string, message: string, rawLine: string) => {
    rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + 1;
    insertReject.run(uploadId, line, reason, message, rawLine);
  };

  // IMMEDIATE takes the write lock now, so no other writer can slip in between our reads and writes.
  db.exec("BEGIN IMMEDIATE");
  try {
    // Clear rejected rows of an earlier failed or interrupted attempt (a retry starts from the raw file).
    db.prepare("DELETE FROM upload_reject WHERE upload_id = ?").run(uploadId);
    const result = await streamLog(
      createReadStream(job.rawPath),
      {
        // The stored mapping is complete (checked at upload): read exactly it, with nothing matched by name again.
        mapping: exactMapping(job.mapping),
        monitor: job.monitor,
        site: job.site,
        onProgress: (bytesRead) => {
          const now = Date.now();
          if (now - lastProgressMs < PROGRESS_EVERY_MS) return;
          lastProgressMs = now;
          post({ type: "progress", uploadId, bytesRead });
        },
      },
      {
        onSample(sample, line, fields, delimiter) {
          if (job.failAfterSamples !== undefined && accepted >= job.failAfterSamples) {
            throw new Error(`Test failure injected after ${accepted} samples.`);
          }
          if (job.pauseAfterSamples !== undefined && accepted === job.pauseAfterSamples.samples) {
            // A synchronous sleep inside the open transaction, like a slow disk would cause.
            Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, job.pauseAfterSamples.ms);
          }
          const changes = insertSample.run(
            campaignId,
            sample.timeMs,
            uploadId,
            sample.seeingArcsec,
            sample.r0Cm,
            sample.zenithDeg,
            sample.seeingLongArcsec,
            sample.seeingTransArcsec,
            sample.anisotropic ? 1 : 0,
            sample.sunAltDeg,
            sample.flux,
            sample.scintIndex,
            sample.tau0Ms,
            sample.theta0Arcsec,
            sample.windMs,
            sample.rhPct,
          ).changes;
          if (changes === 0) {
            // The (campaign, time) key exists: an earlier row of this file or an earlier upload has this time.
            reject(line, "duplicate_time", `Another sample of this campaign already has the time ${new Date(sample.timeMs).toISOString()}.`, fields.join(delimiter));
          } else {
            accepted += 1;
          }
        },
        onReject(line, reason, message, rawLine) {
          reject(line, reason, message, rawLine);
        },
      },
    );
    finish.run(result.rowsRead, accepted, JSON.stringify(rejectedByReason), JSON.stringify(result.mapping), new Date().toISOString(), uploadId);
    // The campaign's samples changed: its data version rises in this same commit (cached summaries of it lapse).
    db.prepare(BUMP_DATA_VERSION_SQL).run(campaignId);
    db.exec("COMMIT");
    post({ type: "done", uploadId, rowsRead: result.rowsRead, accepted, rejectedByReason });
  } catch (error) {
    if (db.inTransaction) db.exec("ROLLBACK");
    post({ type: "failed", uploadId, message: describe(error) });
  }
}

parentPort?.on("message", (message: ToWorker) => {
  if (message.type === "close") {
    connection?.close();
    connection = null;
    parentPort?.close();
    return;
  }
  void ingest(message.job);
});
