import { createReadStream, mkdirSync, rmSync } from "node:fs";
import { setPriority } from "node:os";
import { dirname } from "node:path";
import { parentPort } from "node:worker_threads";
import Database from "better-sqlite3";
import { describeLogFormatError, exactMapping, LogFormatError, type LogSample } from "@calmcrest/seeing-stats";
import { streamLog } from "@calmcrest/seeing-stats/node";
import { tune } from "../db/tune.server";
import { runSampleMove } from "../store/sample-moves";
import { BUMP_DATA_VERSION_SQL } from "../summaries/data-version.server";
import { columnSnapshotDir } from "../summaries/column-snapshot.server";
import { writeSnapshotAfterIngest } from "../summaries/snapshot-at-ingest.server";
import type { FromWorker, IngestJob, ToWorker } from "./ingest-protocol";

// Runs in a worker thread so the HTTP server stays responsive while a large file is parsed and written, and so
// the write transaction can wait on SQLite's busy handler without blocking the main thread's event loop. The file
// is read into a staging database first (no write lock); the write lock is taken only to copy the ready rows in.

const PROGRESS_EVERY_MS = 100;

/**
 * This thread's nice value (Linux sets it per thread): an ingest is background work, so when the cores are busy the
 * scheduler serves the main thread's requests and the summary workers first (on an idle machine it changes nothing).
 */
const INGEST_THREAD_NICE = 10;
try {
  setPriority(INGEST_THREAD_NICE);
} catch {
  // Not allowed here (some containers): the ingest runs at normal priority.
}
let connection: Database.Database | null = null;
let connectionFile = "";

function open(file: string): Database.Database {
  if (connection && connectionFile === file) return connection;
  connection?.close();
  connection = new Database(file);
  tune(connection);
  // This connection's commits are large (a million rows is about 100 MB of WAL): it checkpoints right after each
  // (checkpoint()), once the rows are visible to everyone, rather than inside its COMMIT.
  connection.pragma("wal_autocheckpoint = 0");
  connectionFile = file;
  return connection;
}

/**
 * Copies the WAL's committed pages into the database file (PASSIVE: never waits for readers), while the ingest queue
 * still holds the write gate, so no main-thread commit meets a large WAL and checkpoints it on the event loop.
 */
function checkpoint(db: Database.Database): void {
  db.pragma("wal_checkpoint(PASSIVE)");
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

const SAMPLE_COLUMNS =
  "time_ms, seeing_arcsec, r0_cm, zenith_deg, seeing_long_arcsec, seeing_trans_arcsec, anisotropic, sun_alt_deg, flux, scint_index, tau0_ms, theta0_arcsec, wind_ms, rh_pct";

/** Values per staged row (the time and SAMPLE_COLUMNS after it) and rows per batched insert while staging. */
const STAGED_COLUMNS = 14;
const STAGED_BATCH_ROWS = 32;
/** The staged columns every row has a value (or a computed null) for: time to sun altitude. */
const ALWAYS_STAGED = SAMPLE_COLUMNS.split(", ").slice(0, 8);

/** Columns read from an optional log field of the same name: null in every row when the mapping does not read that field. */
const OPTIONAL_COLUMNS: { field: "flux" | "scint_index" | "tau0_ms" | "theta0_arcsec" | "wind_ms" | "rh_pct"; value: (sample: LogSample) => number | null }[] = [
  { field: "flux", value: (sample) => sample.flux },
  { field: "scint_index", value: (sample) => sample.scintIndex },
  { field: "tau0_ms", value: (sample) => sample.tau0Ms },
  { field: "theta0_arcsec", value: (sample) => sample.theta0Arcsec },
  { field: "wind_ms", value: (sample) => sample.windMs },
  { field: "rh_pct", value: (sample) => sample.rhPct },
];

/** A sample's stored values after its time, in SAMPLE_COLUMNS order. */
function sampleValues(sample: LogSample): (number | null)[] {
  return [
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
  ];
}

/** Where the rows read go: straight into the database (inside the write transaction) or into the staging file. */
interface RowSink {
  /** Stores a readable sample; false when its time is taken (an earlier row of this file or an earlier upload). */
  sample(sample: LogSample, line: number): boolean;
  reject(line: number, reason: string, message: string, rawLine: string): void;
}

interface ReadResult {
  rowsRead: number;
  accepted: number;
  rejectedByReason: Record<string, number>;
  mapping: unknown;
}

/** Streams the stored raw file through the engine into `sink`, counting every row under exactly one outcome. */
async function readInto(job: IngestJob, sink: RowSink): Promise<ReadResult> {
  const rejectedByReason: Record<string, number> = {};
  let accepted = 0;
  let lastProgressMs = 0;
  const { uploadId } = job;
  const reject = (line: number, reason: string, message: string, rawLine: string) => {
    rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + 1;
    sink.reject(line, reason, message, rawLine);
  };
  const result = await streamLog(
    createReadStream(job.rawPath),
    {
      // The stored mapping is complete (checked at upload): read exactly it, with nothing matched by name again.
      mapping: exactMapping(job.mapping),
      monitor: job.monitor,
      site: job.site,
      timeFormat: job.timeFormat,
      utcOffsetMinutes: job.utcOffsetMinutes,
      delimiter: job.delimiter,
      headerLine: job.headerLine,
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
          // A synchronous sleep while reading, like a slow disk would cause.
          Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, job.pauseAfterSamples.ms);
        }
        if (sink.sample(sample, line)) {
          accepted += 1;
        } else {
          reject(line, "duplicate_time", `Another sample of this campaign already has the time ${new Date(sample.timeMs).toISOString()}.`, fields.join(delimiter));
        }
      },
      onReject(line, reason, message, rawLine) {
        reject(line, reason, message, rawLine);
      },
    },
  );
  return { rowsRead: result.rowsRead, accepted, rejectedByReason, mapping: result.mapping };
}

/** Writes the upload's final counts and raises the campaign's data version (cached summaries of it lapse), in the open transaction. */
function finishUpload(db: Database.Database, job: IngestJob, result: ReadResult): void {
  db.prepare(
    `UPDATE upload SET status = 'done', rows_read = ?, samples_accepted = ?, rejected_by_reason = ?, mapping = ?, error = NULL, finished_at = ?
     WHERE id = ?`,
  ).run(result.rowsRead, result.accepted, JSON.stringify(result.rejectedByReason), JSON.stringify(result.mapping), new Date().toISOString(), job.uploadId);
  db.prepare(BUMP_DATA_VERSION_SQL).run(job.campaignId);
  if (job.holdCommitMs !== undefined) Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, job.holdCommitMs);
}

/**
 * Phase 1, without the write lock: reads the whole file into a private staging database (samples keyed by time, so a
 * time repeated in the file is caught; times the campaign already has are looked up in a plain WAL read) and the
 * rejected rows beside them. Other writers (sign-ins, new uploads, exclusions) go on meanwhile.
 */
async function stage(db: Database.Database, job: IngestJob): Promise<{ staging: Database.Database; result: ReadResult }> {
  mkdirSync(dirname(job.stagingPath), { recursive: true });
  rmSync(job.stagingPath, { force: true });
  const staging = new Database(job.stagingPath);
  try {
    // A scratch file: nothing to recover after a crash (start-up removes it), so no journal and no fsync.
    staging.pragma("journal_mode = OFF");
    staging.pragma("synchronous = OFF");
    staging.exec(`CREATE TABLE staged_sample (time_ms INTEGER PRIMARY KEY, seeing_arcsec, r0_cm, zenith_deg, seeing_long_arcsec, seeing_trans_arcsec,
      anisotropic, sun_alt_deg, flux, scint_index, tau0_ms, theta0_arcsec, wind_ms, rh_pct)`);
    staging.exec("CREATE TABLE staged_reject (line INTEGER, reason TEXT, message TEXT, raw_line TEXT)");
    const placeholders = (count: number) => `(${Array.from({ length: count }, () => "?").join(", ")})`;
    const insertOne = staging.prepare(`INSERT OR IGNORE INTO staged_sample (${SAMPLE_COLUMNS}) VALUES ${placeholders(STAGED_COLUMNS)}`);
    // Binding values costs more than SQLite's own work per row: rows go in STAGED_BATCH_ROWS at a time, one
    // statement, with only the columns this file can fill (a column of an optional field the mapping does not read
    // is null in every row and left to its default). Only rows known to be new in the file are batched (see
    // below), so a plain INSERT suffices.
    const optionalRead = OPTIONAL_COLUMNS.filter((column) => job.mapping[column.field] !== undefined && job.mapping[column.field] !== null);
    const optionalUnread = OPTIONAL_COLUMNS.filter((column) => !optionalRead.includes(column));
    const batchedColumns = [...ALWAYS_STAGED, ...optionalRead.map((column) => column.field)];
    const width = batchedColumns.length;
    const insertBatch = staging.prepare(`INSERT INTO staged_sample (${batchedColumns.join(", ")}) VALUES ${Array.from({ length: STAGED_BATCH_ROWS }, () => placeholders(width)).join(", ")}`);
    const insertBatchedOne = staging.prepare(`INSERT INTO staged_sample (${batchedColumns.join(", ")}) VALUES ${placeholders(width)}`);
    const batch: (number | null)[] = Array.from({ length: STAGED_BATCH_ROWS * width }, () => null);
    let batched = 0;
    const flush = () => {
      if (batched === batch.length) insertBatch.run(batch);
      else for (let start = 0; start < batched; start += width) insertBatchedOne.run(batch.slice(start, start + width));
      batched = 0;
    };
    const insertReject = staging.prepare("INSERT INTO staged_reject (line, reason, message, raw_line) VALUES (?, ?, ?, ?)");
    // Only a time inside the campaign's stored range can be taken: most samples need no look-up at all.
    const range = db
      // Two subqueries: each is an index look-up (one SELECT with both aggregates would scan the campaign).
      .prepare("SELECT (SELECT MIN(time_ms) FROM sample WHERE campaign_id = ?) AS first, (SELECT MAX(time_ms) FROM sample WHERE campaign_id = ?) AS last")
      .get(job.campaignId, job.campaignId) as { first: number | null; last: number | null };
    const taken = db.prepare("SELECT 1 FROM sample WHERE campaign_id = ? AND time_ms = ?").pluck();
    // A row later than every earlier row of the file cannot repeat one of their times (logs are written in time order).
    let latestTimeMs = Number.NEGATIVE_INFINITY;
    staging.exec("BEGIN");
    const result = await readInto(job, {
      sample(sample, line) {
        if (range.first !== null && range.last !== null && sample.timeMs >= range.first && sample.timeMs <= range.last && taken.get(job.campaignId, sample.timeMs) !== undefined) {
          return false;
        }
        if (sample.timeMs > latestTimeMs) {
          latestTimeMs = sample.timeMs;
          batch[batched] = sample.timeMs;
          batch[batched + 1] = sample.seeingArcsec;
          batch[batched + 2] = sample.r0Cm;
          batch[batched + 3] = sample.zenithDeg;
          batch[batched + 4] = sample.seeingLongArcsec;
          batch[batched + 5] = sample.seeingTransArcsec;
          batch[batched + 6] = sample.anisotropic ? 1 : 0;
          batch[batched + 7] = sample.sunAltDeg;
          let next = batched + 8;
          for (const column of optionalRead) batch[next++] = column.value(sample);
          for (const column of optionalUnread) {
            if (column.value(sample) !== null) throw new Error(`Line ${line}: a value for ${column.field}, which the mapping does not read; nothing was stored.`);
          }
          batched = next;
          if (batched === batch.length) flush();
          return true;
        }
        // An earlier time may repeat a row already read: the batched rows go in first, then this one, checked.
        flush();
        return insertOne.run(sample.timeMs, ...sampleValues(sample)).changes === 1;
      },
      reject(line, reason, message, rawLine) {
        insertReject.run(line, reason, message, rawLine);
      },
    });
    flush();
    staging.exec("COMMIT");
    return { staging, result };
  } catch (error) {
    staging.close();
    throw error;
  }
}

/**
 * Phase 2, holding the write lock only for this: copies the staged samples and rejected rows into the database and
 * writes the final counts in ONE transaction, so all of the upload is committed or none of it. Returns false (and
 * changes nothing) when a staged time was taken meanwhile; the caller then reads the file again inside the lock.
 */
function commitStaged(db: Database.Database, job: IngestJob, result: ReadResult): boolean {
  db.prepare("ATTACH DATABASE ? AS staging").run(job.stagingPath);
  // Every copied row refers to the same campaign and upload: checked once below, in the transaction, instead of
  // two foreign-key look-ups per row (a third of the copy's time). The pragma cannot change inside a transaction.
  db.pragma("foreign_keys = OFF");
  try {
    db.exec("BEGIN IMMEDIATE");
    try {
      if (db.prepare("SELECT 1 FROM upload JOIN campaign ON campaign.id = upload.campaign_id WHERE upload.id = ? AND upload.campaign_id = ?").get(job.uploadId, job.campaignId) === undefined) {
        throw new Error(`Upload ${job.uploadId} of campaign ${job.campaignId} no longer exists; nothing was stored.`);
      }
      // Clear rejected rows of an earlier failed or interrupted attempt (a retry starts from the raw file).
      db.prepare("DELETE FROM upload_reject WHERE upload_id = ?").run(job.uploadId);
      const copied = db
        .prepare(`INSERT OR IGNORE INTO sample (campaign_id, upload_id, ${SAMPLE_COLUMNS}) SELECT ?, ?, ${SAMPLE_COLUMNS} FROM staging.staged_sample ORDER BY time_ms`)
        .run(job.campaignId, job.uploadId).changes;
      if (copied !== result.accepted) {
        db.exec("ROLLBACK");
        return false;
      }
      db.prepare("INSERT INTO upload_reject (upload_id, line, reason, message, raw_line) SELECT ?, line, reason, message, raw_line FROM staging.staged_reject ORDER BY line").run(job.uploadId);
      finishUpload(db, job, result);
      db.exec("COMMIT");
      return true;
    } catch (error) {
      if (db.inTransaction) db.exec("ROLLBACK");
      throw error;
    }
  } finally {
    db.pragma("foreign_keys = ON");
    db.exec("DETACH DATABASE staging");
  }
}

/** The fallback: reads the file again straight into the database inside one write transaction (the lock held throughout). */
async function ingestInsideLock(db: Database.Database, job: IngestJob): Promise<ReadResult> {
  const insertSample = db.prepare(
    `INSERT OR IGNORE INTO sample (campaign_id, upload_id, ${SAMPLE_COLUMNS}) VALUES (?, ?, ${Array.from({ length: 14 }, () => "?").join(", ")})`,
  );
  const insertReject = db.prepare("INSERT INTO upload_reject (upload_id, line, reason, message, raw_line) VALUES (?, ?, ?, ?, ?)");
  db.exec("BEGIN IMMEDIATE");
  try {
    db.prepare("DELETE FROM upload_reject WHERE upload_id = ?").run(job.uploadId);
    const result = await readInto(job, {
      sample: (sample) => insertSample.run(job.campaignId, job.uploadId, sample.timeMs, ...sampleValues(sample)).changes === 1,
      reject: (line, reason, message, rawLine) => void insertReject.run(job.uploadId, line, reason, message, rawLine),
    });
    finishUpload(db, job, result);
    db.exec("COMMIT");
    return result;
  } catch (error) {
    if (db.inTransaction) db.exec("ROLLBACK");
    throw error;
  }
}

/** Resolves when the ingest queue says the write gate is ours (see IngestQueue): no main-thread writer is mid-write. */
let grantCommit: (() => void) | null = null;

function commitGranted(): Promise<void> {
  return new Promise((resolve) => {
    grantCommit = resolve;
  });
}

/**
 * Ingests one upload: reads the file into a staging database while others write as usual, asks the ingest queue
 * for the write gate ("ready"), then commits every sample, every rejected row and the final counts in one short
 * transaction. A failure anywhere leaves no sample behind.
 */
async function ingest(job: IngestJob): Promise<void> {
  const db = open(job.dbFile);
  let staging: Database.Database | null = null;
  try {
    const staged = await stage(db, job);
    staging = staged.staging;
    const granted = commitGranted();
    post({ type: "ready", uploadId: job.uploadId });
    await granted;
    let result = staged.result;
    if (!commitStaged(db, job, result)) result = await ingestInsideLock(db, job);
    // The rows are committed (the upload reads `done`): the scratch file goes at once, then the checkpoint.
    staging.close();
    staging = null;
    rmSync(job.stagingPath, { force: true });
    checkpoint(db);
    post({ type: "done", uploadId: job.uploadId, rowsRead: result.rowsRead, accepted: result.accepted, rejectedByReason: result.rejectedByReason });
    // After the commit, for the new data version: the first summary of it reads this file, not the rows.
    writeSnapshotAfterIngest(db, columnSnapshotDir(job.dbFile), job.campaignId);
  } catch (error) {
    post({ type: "failed", uploadId: job.uploadId, message: describe(error) });
  } finally {
    staging?.close();
    rmSync(job.stagingPath, { force: true });
  }
}

parentPort?.on("message", (message: ToWorker) => {
  if (message.type === "close") {
    connection?.close();
    connection = null;
    parentPort?.close();
    return;
  }
  if (message.type === "commit") {
    grantCommit?.();
    grantCommit = null;
    return;
  }
  if (message.type === "move") {
    // Synchronous: while it runs, an ingest being staged simply pauses (its commit cannot be granted meanwhile, the
    // queue holds the write gate for this move).
    try {
      const db = open(message.dbFile);
      const outcome = runSampleMove(db, message.job);
      checkpoint(db);
      post({ type: "moved", moveId: message.moveId, outcome });
    } catch (error) {
      post({ type: "move-failed", moveId: message.moveId, message: describe(error) });
    }
    return;
  }
  void ingest(message.job);
});
