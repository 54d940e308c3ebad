import { join } from "node:path";
import { Worker } from "node:worker_threads";
import type { RequestHandler } from "express";
import type { ColumnMapping } from "@calmcrest/seeing-stats";
import { effectiveCampaign, monitorForFile, monitorOf, readOptionsOf, siteLocationOf, type Store, type WriteGate } from "../store/index";
import type { SampleMover } from "../store/core";
import type { SampleMoveJob, SampleMoveOutcome } from "../store/sample-moves";
import { rawFilePath, tmpDir } from "../uploads/raw-files.server";
import type { FromWorker, IngestJob, ToWorker } from "./ingest-protocol";

/**
 * The in-process ingest queue: one ingest at a time (SQLite has one writer anyway), run in a worker thread.
 * Progress of the running ingest is kept in memory for GET /api/uploads/:id. The worker reads the whole file into
 * a staging file first, while main-thread writes go on; only when it says "ready" does the queue take the write
 * gate (once the main-thread writes in progress are done) and let it commit, so the write lock is held for the
 * copy of rows already read, never for the reading of the file.
 */
export class IngestQueue implements SampleMover {
  private readonly waiting: number[] = [];
  /** Sample moves sent to the worker, by id, waiting for its answer. */
  private readonly moves = new Map<number, { resolve: (outcome: SampleMoveOutcome) => void; reject: (error: Error) => void }>();
  private nextMoveId = 1;
  private readonly movesInFlight = new Set<Promise<unknown>>();
  private readonly progressByUpload = new Map<number, number>();
  /** Releases the write gate the running ingest's commit holds (null while it holds none). */
  private commitRelease: (() => void) | null = null;
  private running: { uploadId: number; campaignId: number; sizeBytes: number; settle: () => void; ready: () => void } | null = null;
  private worker: Worker | null = null;
  private stopped = false;
  private busy = false;
  private idleWaiters: (() => void)[] = [];
  /** Test-only knobs (ignored outside NODE_ENV=test). */
  readonly testHooks: { failAfterSamples?: number; pauseAfterSamples?: { samples: number; ms: number }; holdCommitMs?: number } = {};

  constructor(
    private readonly store: Store,
    private readonly gate: WriteGate,
    private readonly options: { dbFile: string; dataDir: string; allowTestHooks: boolean },
  ) {
    // The last main-thread writer leaving the gate lets a waiting ingest start.
    gate.onFree(() => void this.pump());
    store.core.useSampleMover(this);
  }

  /**
   * Runs a withdrawal, restore or re-read in the worker (store/sample-moves.ts): waits asynchronously for the write
   * gate (no main-thread write in progress, no ingest committing), holds it while the worker moves the samples in
   * one transaction on its own connection, and resolves with the outcome. The event loop keeps answering meanwhile.
   */
  moveSamples(job: SampleMoveJob): Promise<SampleMoveOutcome> {
    if (this.stopped) return Promise.reject(new Error("The server is stopping; try again once it has restarted."));
    const run = (async () => {
      const release = await this.gate.holdExclusive();
      try {
        const moveId = this.nextMoveId;
        this.nextMoveId += 1;
        return await new Promise<SampleMoveOutcome>((resolve, reject) => {
          this.moves.set(moveId, { resolve, reject });
          this.ensureWorker().postMessage({ type: "move", moveId, dbFile: this.options.dbFile, job } satisfies ToWorker);
        });
      } finally {
        release();
      }
    })();
    this.movesInFlight.add(run);
    void run.catch(() => undefined).finally(() => this.movesInFlight.delete(run));
    return run;
  }

  /** A worker that died or exited answers no move it was given: each fails (its transaction never committed). */
  private failMoves(reason: string): void {
    for (const [moveId, pending] of this.moves) {
      this.moves.delete(moveId);
      pending.reject(new Error(reason));
    }
  }

  /** Queues a stored upload (status queued) for ingest. */
  enqueue(uploadId: number): void {
    if (this.stopped) return;
    if (this.waiting.includes(uploadId) || this.running?.uploadId === uploadId) return;
    this.waiting.push(uploadId);
    this.progressByUpload.set(uploadId, 0);
    void this.pump();
  }

  /** Runs a main-thread write outside any ingest (see WriteGate); store writes do this themselves. */
  withWriteSlot<T>(write: () => Promise<T>): Promise<T> {
    return this.gate.withSlot(write);
  }

  /** The same as withWriteSlot for code that cannot wrap its writes in one function (Lucia's session writes); call the returned release once. */
  acquireWriteSlot(): Promise<() => void> {
    return this.gate.acquire();
  }

  /** 0..1 for a queued or running upload; undefined when it is not in the queue. */
  progress(uploadId: number): number | undefined {
    return this.progressByUpload.get(uploadId);
  }

  /** Resolves when nothing is queued or running. */
  idle(): Promise<void> {
    if (!this.busy && this.waiting.length === 0) return Promise.resolve();
    return new Promise((resolve) => this.idleWaiters.push(resolve));
  }

  /** Lets the running ingest finish, drops the rest (they stay `queued` and are re-queued at the next start), stops the worker. */
  async stop(): Promise<void> {
    this.stopped = true;
    this.waiting.length = 0;
    if (this.busy) await new Promise<void>((resolve) => this.idleWaiters.push(resolve));
    await Promise.allSettled(this.movesInFlight);
    const worker = this.worker;
    this.worker = null;
    if (worker) {
      const exited = new Promise<void>((resolve) => worker.once("exit", () => resolve()));
      worker.postMessage({ type: "close" } satisfies ToWorker);
      // close() ends the worker's message port, so it exits; terminate() is the fallback.
      const timeout = setTimeout(() => void worker.terminate(), 2000);
      await exited;
      clearTimeout(timeout);
    }
  }

  /** Starts the worker thread ahead of the first ingest (the server does at start-up; test servers start it on demand). */
  warmUp(): void {
    if (!this.stopped) this.ensureWorker();
  }

  private ensureWorker(): Worker {
    if (this.worker) return this.worker;
    const worker = new Worker(new URL("./ingest-worker.mjs", import.meta.url));
    worker.on("message", (message: FromWorker) => this.onMessage(message));
    worker.on("error", (error) => {
      // The worker died (out of memory, a bug): the running upload failed; a fresh worker serves the next one.
      this.worker = null;
      this.failMoves(`The ingest worker stopped unexpectedly: ${error.message}. Nothing was changed; try again.`);
      const running = this.running;
      if (running) void this.finishFailed(running.uploadId, `The ingest stopped unexpectedly: ${error.message}`);
    });
    worker.on("exit", () => {
      if (this.worker === worker) this.worker = null;
      this.failMoves("The ingest worker stopped. Nothing was changed; try again.");
    });
    this.worker = worker;
    return worker;
  }

  private onMessage(message: FromWorker): void {
    if (message.type === "moved" || message.type === "move-failed") {
      const pending = this.moves.get(message.moveId);
      this.moves.delete(message.moveId);
      if (message.type === "moved") pending?.resolve(message.outcome);
      else pending?.reject(new Error(message.message));
      return;
    }
    const running = this.running;
    if (!running || running.uploadId !== message.uploadId) return;
    if (message.type === "ready") {
      running.ready();
      return;
    }
    if (message.type === "progress") {
      this.progressByUpload.set(message.uploadId, Math.min(0.99, message.bytesRead / Math.max(1, running.sizeBytes)));
      return;
    }
    if (message.type === "done") {
      this.store.uploads.ingestCommitted(running.uploadId, running.campaignId);
      running.settle();
      return;
    }
    void this.finishFailed(message.uploadId, message.message);
  }

  private async finishFailed(uploadId: number, error: string): Promise<void> {
    // While this ingest's commit holds the gate, waiting for it would wait for itself.
    await this.store.uploads.markFailed(uploadId, error, { holdsGate: this.commitRelease !== null });
    this.running?.settle();
  }

  private async pump(): Promise<void> {
    // `busy` is set before the first await, so two enqueues in a row cannot start two ingests.
    if (this.busy) return;
    const uploadId = this.stopped ? undefined : this.waiting.shift();
    if (uploadId === undefined) {
      for (const resolve of this.idleWaiters.splice(0)) resolve();
      return;
    }
    this.busy = true;
    try {
      const job = await this.jobFor(uploadId);
      if (job) {
        await new Promise<void>((settle) => {
          // The worker has read and staged the file: take the gate as soon as no main-thread write is in progress.
          const ready = async () => {
            const release = await this.gate.holdExclusive();
            if (this.running?.uploadId !== uploadId) {
              release();
              return;
            }
            this.commitRelease = release;
            this.worker?.postMessage({ type: "commit", uploadId } satisfies ToWorker);
          };
          this.running = { uploadId, campaignId: job.campaignId, sizeBytes: job.sizeBytes, settle, ready: () => void ready() };
          void this.store.uploads
            .markIngesting(uploadId)
            .then(() => this.ensureWorker().postMessage({ type: "job", job } satisfies ToWorker))
            .catch((error: unknown) => void this.finishFailed(uploadId, error instanceof Error ? error.message : String(error)));
        });
      }
    } finally {
      this.running = null;
      this.busy = false;
      this.progressByUpload.delete(uploadId);
      // Writers that waited for this ingest's commit go first (their continuations run before setImmediate fires).
      const release = this.commitRelease;
      this.commitRelease = null;
      release?.();
    }
    setImmediate(() => void this.pump());
  }

  private async jobFor(uploadId: number): Promise<IngestJob | null> {
    const input = await this.store.uploads.jobInput(uploadId);
    if (!input) return null;
    const { upload, campaign, site } = input;
    const job: IngestJob = {
      uploadId,
      campaignId: campaign.id,
      dbFile: this.options.dbFile,
      rawPath: rawFilePath(this.options.dataDir, upload.sha256),
      stagingPath: join(tmpDir(this.options.dataDir), `ingest-${uploadId}.staging.sqlite`),
      sizeBytes: upload.size_bytes,
      mapping: JSON.parse(upload.mapping) as ColumnMapping,
      // A re-read may carry corrected monitor settings; otherwise the campaign's.
      // The file's own wavelength (read options), when it was given, in place of the monitor's.
      monitor: monitorForFile(monitorOf(effectiveCampaign(campaign, upload)), readOptionsOf(upload)),
      ...readOptionsOf(upload),
      site: siteLocationOf(site),
    };
    if (this.options.allowTestHooks && this.testHooks.failAfterSamples !== undefined) job.failAfterSamples = this.testHooks.failAfterSamples;
    if (this.options.allowTestHooks && this.testHooks.pauseAfterSamples !== undefined) job.pauseAfterSamples = this.testHooks.pauseAfterSamples;
    if (this.options.allowTestHooks && this.testHooks.holdCommitMs !== undefined) job.holdCommitMs = this.testHooks.holdCommitMs;
    return job;
  }
}

/**
 * Start-up recovery: an upload left `ingesting` belonged to a process that died mid-ingest. Its samples cannot
 * exist (one transaction), so it is marked `interrupted` for a person to retry. Uploads still `queued` never
 * started: they are simply queued again.
 */
export async function recoverUploads(store: Store, queue: IngestQueue): Promise<{ interrupted: number; requeued: number }> {
  const { interrupted, queuedIds } = await store.uploads.recoverAtStartup();
  for (const id of queuedIds) queue.enqueue(id);
  return { interrupted, requeued: queuedIds.length };
}

const READ_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Holds a write slot (see IngestQueue.withWriteSlot) for the whole of a state-changing JSON request, so its
 * writes never wait inside SQLite for an ingest. Not for file uploads: receiving a large file while holding the
 * slot would hold up the next ingest; the upload route takes the slot only for its own inserts.
 */
export function writeSlot(queue: Pick<IngestQueue, "acquireWriteSlot">): RequestHandler {
  return async (req, res, next) => {
    if (READ_METHODS.has(req.method) || /\/uploads(\/|$)/.test(req.path)) return next();
    const release = await queue.acquireWriteSlot();
    res.on("close", release);
    next();
  };
}
