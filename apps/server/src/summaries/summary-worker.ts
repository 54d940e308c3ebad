import { parentPort, workerData } from "node:worker_threads";
import Database from "better-sqlite3";
import { columnSnapshotDir } from "./column-snapshot.server";
import { SampleCache } from "./sample-cache.server";
import type { FromSummaryWorker, SummaryWorkerOptions, ToSummaryWorker } from "./summary-protocol";
import { warmUpEngine } from "./warm-up.server";
import { SUMMARY_TASKS, type SummaryTaskInputs, type SummaryTaskKind } from "./tasks.server";

// A summary worker thread: its own read-only SQLite connection and its own per-campaign column cache, so loading
// a million rows and computing a summary never run on the main thread (docs/decisions/0008-summary-cache-and-workers.md).
// It reads in WAL mode: an ingest's open write transaction never blocks it, and it never writes.

const options = workerData as SummaryWorkerOptions;
const connection = new Database(options.dbFile, { readonly: true, fileMustExist: true });
// A reader never needs the write lock; a short busy wait covers the moment a checkpoint resets the WAL.
connection.pragma("busy_timeout = 5000");
// Column snapshots beside the database (data/cache/columns): a restarted worker reads them instead of the rows.
const cache = new SampleCache(connection, { maxBytes: options.columnCacheMaxBytes, snapshotDir: columnSnapshotDir(options.dbFile) });

/**
 * A task over a million samples leaves tens of megabytes of typed arrays behind (selections, sorts, bootstrap
 * work); V8 counts them as external memory and may hold them for a long while before a collection, so a busy
 * server's resident memory stays hundreds of megabytes above what it keeps. After a task long enough to have made
 * such garbage, a full collection gives it back at once (the summary service exposes gc to its workers).
 */
const collect = (globalThis as { gc?: () => void }).gc;
function collectGarbageAfter(taskMs: number): void {
  if (collect !== undefined && taskMs >= COLLECT_AFTER_TASK_MS) collect();
}
const COLLECT_AFTER_TASK_MS = 50;

function post(message: FromSummaryWorker): void {
  parentPort?.postMessage(message);
}

const encoder = new TextEncoder();

function runTask<Kind extends SummaryTaskKind>(kind: Kind, input: SummaryTaskInputs[Kind]): { body: Uint8Array; versions: number[] } {
  const definition = SUMMARY_TASKS[kind] as {
    campaignIds(input: SummaryTaskInputs[Kind]): readonly number[];
    run(cache: SampleCache, input: SummaryTaskInputs[Kind]): unknown;
    axes?: boolean;
  };
  const campaignIds = definition.campaignIds(input);
  const { versions } = cache.sync(campaignIds, { axes: definition.axes === true });
  try {
    const value = definition.run(cache, input);
    // A typed array is sent as its bytes (a copy the worker gives away); everything else as UTF-8 JSON.
    const body = ArrayBuffer.isView(value) ? new Uint8Array(value.buffer.slice(value.byteOffset, value.byteOffset + value.byteLength)) : encoder.encode(JSON.stringify(value));
    return { body, versions };
  } finally {
    cache.unpin(campaignIds);
  }
}

parentPort?.on("message", (message: ToSummaryWorker) => {
  if (message.type === "close") {
    connection.close();
    parentPort?.close();
    return;
  }
  const startedMs = performance.now();
  try {
    const { body, versions } = runTask(message.kind, message.input);
    const result: FromSummaryWorker = { type: "result", id: message.id, body, versions, computeMs: performance.now() - startedMs, columnBytes: cache.bytesHeld };
    parentPort?.postMessage(result, [body.buffer as ArrayBuffer]);
    collectGarbageAfter(performance.now() - startedMs);
  } catch (error) {
    post({ type: "error", id: message.id, message: error instanceof Error ? error.message : String(error) });
  }
});

// The engine's code compiled before the first request (nothing stored is read).
warmUpEngine();
post({ type: "ready" });
