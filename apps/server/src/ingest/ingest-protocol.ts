import type { ColumnMapping, DelimiterChoice, MonitorSettings, SiteLocation, TimeFormat } from "@calmcrest/seeing-stats";
import type { SampleMoveJob, SampleMoveOutcome } from "../store/sample-moves";

// Messages between the ingest queue (main thread) and the ingest worker thread.

export interface IngestJob {
  uploadId: number;
  campaignId: number;
  dbFile: string;
  rawPath: string;
  /** A scratch SQLite file in <dataDir>/tmp where the rows are read before the commit (removed after; start-up removes leftovers). */
  stagingPath: string;
  sizeBytes: number;
  mapping: ColumnMapping;
  monitor: MonitorSettings;
  /** How the file's times are written (null in the row: ISO 8601 UTC). */
  timeFormat: TimeFormat;
  utcOffsetMinutes: number;
  /** The delimiter the upload named (detected when absent). */
  delimiter?: DelimiterChoice | undefined;
  /** The line of the column names the upload named; the lines above are preamble. */
  headerLine?: number | undefined;
  site: SiteLocation;
  /** Test-only: throw after this many stored samples, to prove a failed ingest leaves nothing behind. */
  failAfterSamples?: number;
  /** Test-only: sleep this long after that many samples while reading the file (before the write lock is taken). */
  pauseAfterSamples?: { samples: number; ms: number };
  /** Test-only: hold the commit's open write transaction this long, to test writers meanwhile. */
  holdCommitMs?: number;
}

/**
 * "commit": the queue holds the write gate for this ingest; the worker may take SQLite's write lock now.
 * "move": a withdrawal, restore or re-read (store/sample-moves.ts); the queue holds the write gate for it.
 */
export type ToWorker =
  | { type: "job"; job: IngestJob }
  | { type: "commit"; uploadId: number }
  | { type: "move"; moveId: number; dbFile: string; job: SampleMoveJob }
  | { type: "close" };

export type FromWorker =
  | { type: "progress"; uploadId: number; bytesRead: number }
  /** The whole file is read and staged; the worker waits for "commit". */
  | { type: "ready"; uploadId: number }
  | { type: "done"; uploadId: number; rowsRead: number; accepted: number; rejectedByReason: Record<string, number> }
  | { type: "failed"; uploadId: number; message: string }
  /** A move committed or was refused (outcome), or failed on an error (message; nothing changed). */
  | { type: "moved"; moveId: number; outcome: SampleMoveOutcome }
  | { type: "move-failed"; moveId: number; message: string };
