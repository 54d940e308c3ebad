import type { ColumnMapping, MonitorSettings, SiteLocation } from "@calmcrest/seeing-stats";

// Messages between the ingest queue (main thread) and the ingest worker thread.

export interface IngestJob {
  uploadId: number;
  campaignId: number;
  dbFile: string;
  rawPath: string;
  sizeBytes: number;
  mapping: ColumnMapping;
  monitor: MonitorSettings;
  site: SiteLocation;
  /** Test-only: throw after this many stored samples, to prove a failed ingest leaves nothing behind. */
  failAfterSamples?: number;
  /** Test-only: hold the open transaction this long after that many samples, to test writers meanwhile. */
  pauseAfterSamples?: { samples: number; ms: number };
}

export type ToWorker = { type: "job"; job: IngestJob } | { type: "close" };

export type FromWorker =
  | { type: "progress"; uploadId: number; bytesRead: number }
  | { type: "done"; uploadId: number; rowsRead: number; accepted: number; rejectedByReason: Record<string, number> }
  | { type: "failed"; uploadId: number; message: string };
