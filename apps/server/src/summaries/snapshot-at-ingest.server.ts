import type Database from "better-sqlite3";
import { SampleCache } from "./sample-cache.server";

// The column snapshot of a campaign written by the ingest worker right after an ingest commits, so the first summary
// or comparison of the new data (even in another server process, after a restart) reads the file instead of a
// million rows through SQLite. It goes through the very code a summary worker uses (SampleCache.sync reads the
// columns and the data version in one read snapshot; seeingSort sorts them and writes the file named by that
// version and the samples' fingerprint), so the file is exactly what a worker would have written. A later change
// raises the version, and a worker never uses a file written at another version or of other samples.

/** Reads the campaign's committed samples, sorts them and writes their snapshot into `snapshotDir`. Never throws: the file is only an optimisation. */
export function writeSnapshotAfterIngest(sqlite: Database.Database, snapshotDir: string, campaignId: number): void {
  try {
    const cache = new SampleCache(sqlite, { snapshotDir });
    cache.sync([campaignId]);
    cache.seeingSort(campaignId);
    cache.unpin([campaignId]);
  } catch (error) {
    console.warn(`calmcrest: no column snapshot for campaign ${campaignId} after its ingest (${error instanceof Error ? error.message : String(error)}); its first summary reads SQLite instead.`);
  }
}
