import { createHash } from "node:crypto";
import { availableParallelism } from "node:os";
import { setFlagsFromString } from "node:v8";
import { promisify } from "node:util";
import { gzip } from "node:zlib";
import { Worker } from "node:worker_threads";
import type Database from "better-sqlite3";
import type { Request, Response } from "express";
import { readDataVersions } from "./data-version.server";
import type { FromSummaryWorker, SummaryWorkerOptions, ToSummaryWorker } from "./summary-protocol";
import type { SamplesQuery, SiteSummaryBrief, SummaryQuery } from "@calmcrest/contracts";
import type { CampaignRow, IngestRejections, SiteRow } from "../store/index";
import { resolveQuery } from "./summarize.server";
import type { SummaryTaskInputs, SummaryTaskKind } from "./tasks.server";

// The summary service: every summary, site-list brief and sample series the API answers goes through compute().
// Answers are cached as JSON text under (task kind, campaigns, their data versions, the request's normalised key);
// a miss is computed by a small pool of worker threads (summary-worker.ts) that hold their own read-only SQLite
// connection and sample columns, and identical requests in flight share one computation. See
// docs/decisions/0008-summary-cache-and-workers.md.

/** Bound of the cached answers (JSON text), in bytes and in count. */
export const RESULT_CACHE_MAX_BYTES = 64 * 1024 * 1024;
export const RESULT_CACHE_MAX_ENTRIES = 5000;
/** Bound of the sample columns all summary workers hold together, in bytes (about 53 bytes a sample with its sort). */
export const COLUMN_CACHE_MAX_BYTES = 256 * 1024 * 1024;
/**
 * Two workers on a machine of two cores or more, one on a single core. A comparison is split across both (its
 * rows' summaries on one, its pairs on the other); the main thread needs little CPU while they compute.
 */
export const DEFAULT_SUMMARY_WORKERS = Math.min(2, Math.max(1, availableParallelism()));
/** A computation whose campaigns changed while it ran is done again (with fresh inputs) at most this often. */
const MAX_ATTEMPTS = 3;

export interface SummaryServiceOptions {
  dbFile: string;
  /** The main thread's raw connection, for reading data versions (a WAL read: never waits for a writer). */
  sqlite: Database.Database;
  workers?: number;
  resultCacheMaxBytes?: number;
  resultCacheMaxEntries?: number;
  columnCacheMaxBytes?: number;
}

export interface ComputeRequest<Kind extends SummaryTaskKind> {
  /** The campaigns the answer depends on (their data versions join the cache key). */
  campaignIds: readonly number[];
  /**
   * Everything else the answer depends on, normalised (filters with their defaults filled in, the site's and
   * campaigns' summarised fields): two requests with the same key get the same cached answer.
   */
  key: string;
  /** The task's input, only asked for on a miss (it may read the database). */
  input: () => Promise<SummaryTaskInputs[Kind]> | SummaryTaskInputs[Kind];
  /**
   * With two or more workers: the input cut into parts that different workers compute at the same time, and how
   * their answers (UTF-8 JSON) join into the one answer a single worker would give. Without it, or with one worker,
   * one worker computes the whole input.
   */
  split?: { parts(input: SummaryTaskInputs[Kind]): SummaryTaskInputs[Kind][]; merge(bodies: Buffer[]): Buffer };
}

export interface SummaryServiceStats {
  hits: number;
  misses: number;
  /** Misses that joined a computation already running for the same key. */
  shared: number;
  computations: number;
  cachedAnswers: number;
  cachedBytes: number;
  /** Bytes of sample columns the workers reported holding after their last task. */
  workerColumnBytes: number;
}

interface PendingTask {
  resolve(result: { body: Buffer; versions: number[] }): void;
  reject(error: Error): void;
}

/** One worker thread and the tasks sent to it. */
class SummaryWorker {
  private worker: Worker | null = null;
  private readonly pending = new Map<number, PendingTask>();
  private nextId = 1;
  private ready: Promise<void> = Promise.resolve();
  private markReady: () => void = () => undefined;
  columnBytes = 0;

  constructor(private readonly options: SummaryWorkerOptions) {}

  private ensure(): Worker {
    if (this.worker) return this.worker;
    // The worker frees the garbage of a large task at once (summary-worker.ts): V8 flags are per process and read
    // when an isolate starts, so this gives the worker threads started from now on a gc() function.
    setFlagsFromString("--expose-gc");
    const worker = new Worker(new URL("./summary-worker.mjs", import.meta.url), { workerData: this.options });
    this.ready = new Promise((resolve) => {
      this.markReady = resolve;
    });
    worker.on("message", (message: FromSummaryWorker) => {
      if (message.type === "ready") {
        this.markReady();
        return;
      }
      const task = this.pending.get(message.id);
      if (!task) return;
      this.pending.delete(message.id);
      if (message.type === "result") {
        this.columnBytes = message.columnBytes;
        task.resolve({ body: Buffer.from(message.body.buffer, message.body.byteOffset, message.body.byteLength), versions: message.versions });
      } else {
        task.reject(new Error(message.message));
      }
    });
    const fail = (error: Error) => {
      if (this.worker === worker) this.worker = null;
      this.markReady();
      // A dead worker (out of memory, a bug) fails what it was given; the next task starts a fresh one.
      for (const task of this.pending.values()) task.reject(error);
      this.pending.clear();
    };
    worker.on("error", fail);
    worker.on("exit", (code) => fail(new Error(`The summary worker stopped (exit code ${code}).`)));
    this.worker = worker;
    return worker;
  }

  /** Starts the thread; resolves once it has loaded its code (or failed: the next task starts a fresh one). */
  start(): Promise<void> {
    this.ensure();
    return this.ready;
  }

  get queued(): number {
    return this.pending.size;
  }

  run<Kind extends SummaryTaskKind>(kind: Kind, input: SummaryTaskInputs[Kind]): Promise<{ body: Buffer; versions: number[] }> {
    const worker = this.ensure();
    const id = this.nextId;
    this.nextId += 1;
    return new Promise((resolve, reject) => {
      this.pending.set(id, { resolve, reject });
      worker.postMessage({ type: "task", id, kind, input } satisfies ToSummaryWorker);
    });
  }

  async close(): Promise<void> {
    const worker = this.worker;
    this.worker = null;
    if (!worker) return;
    const exited = new Promise<void>((resolve) => worker.once("exit", () => resolve()));
    worker.postMessage({ type: "close" } satisfies ToSummaryWorker);
    const timeout = setTimeout(() => void worker.terminate(), 2000);
    await exited;
    clearTimeout(timeout);
  }
}

/**
 * A cached answer: UTF-8 JSON, sent as it is, its gzip-compressed copy (made once, off the main thread, for the
 * browsers that accept gzip: about a third of the bytes to write per request) and its ETag (from the cache key,
 * which names everything the answer depends on; weak, so it stands for both encodings).
 */
export interface SummaryAnswer {
  body: Buffer;
  /** The body gzip-compressed; absent for a body too small to gain from it. */
  gzipped?: Buffer;
  etag: string;
}

/** Answers smaller than this are sent as they are (compressing them saves less than the encoding's own headers cost). */
const GZIP_MIN_BYTES = 1024;
const gzipAsync = promisify(gzip);

/** Bytes a cached answer and its key take (the key at two bytes a character, the most a V8 string uses). */
function answerBytes(key: string, answer: SummaryAnswer): number {
  return key.length * 2 + answer.body.byteLength + (answer.gzipped?.byteLength ?? 0) + answer.etag.length * 2;
}

/** The answer of a computed body: its ETag, and its gzip copy made in libuv's thread pool (never on the main thread). */
async function answerOf(key: string, body: Buffer): Promise<SummaryAnswer> {
  const etag = `W/"${createHash("sha256").update(key).digest("base64url").slice(0, 32)}"`;
  if (body.byteLength < GZIP_MIN_BYTES) return { body, etag };
  return { body, gzipped: await gzipAsync(body, { level: 6 }), etag };
}

/** The query with the engine's defaults filled in, as cache-key text: `?maxZenithDeg=60` and no parameter are the same answer. */
function queryKey(query: SummaryQuery): string {
  const { from, to, filters } = resolveQuery(query);
  return JSON.stringify([from, to, filters.maxZenithDeg, filters.sunMaxDeg, filters.minFlux, filters.leaveOutAnisotropic]);
}

/** The fields of the site and its campaigns a summary shows besides the samples (names, longitude, monitor). */
function scopeKey(site: SiteRow, campaigns: readonly CampaignRow[]): string {
  return JSON.stringify([
    site.id,
    site.name,
    site.longitude,
    site.latitude,
    campaigns.map((campaign) => [campaign.id, campaign.name, campaign.height_above_ground_m, campaign.response, campaign.wavelength_nm]),
  ]);
}

function sameVersions(left: readonly number[], right: readonly number[]): boolean {
  return left.length === right.length && left.every((version, index) => version === right[index]);
}

export class SummaryService {
  private readonly answers = new Map<string, SummaryAnswer>();
  private answerBytes = 0;
  private readonly inFlight = new Map<string, Promise<SummaryAnswer>>();
  private readonly workers: SummaryWorker[];
  private readonly maxBytes: number;
  private readonly maxEntries: number;
  private readonly counters = { hits: 0, misses: 0, shared: 0, computations: 0 };

  constructor(private readonly options: SummaryServiceOptions) {
    const workerCount = Math.max(1, Math.floor(options.workers ?? DEFAULT_SUMMARY_WORKERS));
    const columnCacheMaxBytes = Math.floor((options.columnCacheMaxBytes ?? COLUMN_CACHE_MAX_BYTES) / workerCount);
    this.workers = Array.from({ length: workerCount }, () => new SummaryWorker({ dbFile: options.dbFile, columnCacheMaxBytes }));
    this.maxBytes = options.resultCacheMaxBytes ?? RESULT_CACHE_MAX_BYTES;
    this.maxEntries = options.resultCacheMaxEntries ?? RESULT_CACHE_MAX_ENTRIES;
  }

  /**
   * The answer of task `kind` as JSON text: from the cache when the campaigns' data versions are the ones it was
   * computed at, else computed by a worker (once for all identical requests in flight) and cached. The versions
   * are read when the request is served, so a request made after a change committed never gets an answer from
   * before it.
   */
  compute<Kind extends SummaryTaskKind>(kind: Kind, request: ComputeRequest<Kind>): Promise<SummaryAnswer> {
    const versions = readDataVersions(this.options.sqlite, request.campaignIds);
    const cacheKey = `${kind}|${request.campaignIds.join(",")}|v${versions.join(",")}|${request.key}`;
    const cached = this.answers.get(cacheKey);
    if (cached !== undefined) {
      this.counters.hits += 1;
      // Map order is the LRU order: move it to the end.
      this.answers.delete(cacheKey);
      this.answers.set(cacheKey, cached);
      return Promise.resolve(cached);
    }
    this.counters.misses += 1;
    const running = this.inFlight.get(cacheKey);
    if (running) {
      this.counters.shared += 1;
      return running;
    }
    const computation = this.computeFresh(kind, request, versions, cacheKey).finally(() => this.inFlight.delete(cacheKey));
    this.inFlight.set(cacheKey, computation);
    return computation;
  }

  private async computeFresh<Kind extends SummaryTaskKind>(kind: Kind, request: ComputeRequest<Kind>, versions: number[], cacheKey: string): Promise<SummaryAnswer> {
    let expected = versions;
    let key = cacheKey;
    for (let attempt = 1; ; attempt += 1) {
      const input = await request.input();
      this.counters.computations += 1;
      const result = request.split && this.workers.length >= 2 ? await this.runSplit(kind, input, request.campaignIds, request.split) : await this.workerFor(request.campaignIds).run(kind, input);
      const answer = await answerOf(key, result.body);
      if (sameVersions(result.versions, expected)) {
        this.remember(key, answer);
        return answer;
      }
      // A campaign changed between reading the versions (and the input) and the worker's snapshot: the samples are
      // newer than the input, so compute again from fresh inputs; after a few tries give the newest as it is.
      if (attempt >= MAX_ATTEMPTS) return answer;
      expected = readDataVersions(this.options.sqlite, request.campaignIds);
      key = `${kind}|${request.campaignIds.join(",")}|v${expected.join(",")}|${request.key}`;
    }
  }

  /** The parts on different workers at once (the first on the campaigns' own worker), joined; versions only when every part saw the same. */
  private async runSplit<Kind extends SummaryTaskKind>(
    kind: Kind,
    input: SummaryTaskInputs[Kind],
    campaignIds: readonly number[],
    split: NonNullable<ComputeRequest<Kind>["split"]>,
  ): Promise<{ body: Buffer; versions: number[] }> {
    const first = this.workers.indexOf(this.workerFor(campaignIds));
    const results = await Promise.all(split.parts(input).map((part, index) => this.workers[(first + index) % this.workers.length]?.run(kind, part) ?? Promise.reject(new Error("The summary service has no worker."))));
    const [head] = results;
    if (!head) throw new Error("A split computation needs at least one part.");
    // Parts that read different committed states cannot be joined as one answer: report a version no request
    // expects, so the computation is done again.
    const versions = results.every((result) => sameVersions(result.versions, head.versions)) ? head.versions : head.versions.map(() => -1);
    return { body: split.merge(results.map((result) => result.body)), versions };
  }

  /** Starts every worker thread now (loading its code takes most of a second of CPU) and resolves when all are ready, so no request waits for it. */
  async start(): Promise<void> {
    await Promise.all(this.workers.map((worker) => worker.start()));
  }

  /** The same campaigns go to the same worker (so their columns are held once); otherwise the least busy. */
  private workerFor(campaignIds: readonly number[]): SummaryWorker {
    const first = campaignIds[0];
    if (this.workers.length === 1 || first === undefined) return this.leastBusy();
    const preferred = this.workers[first % this.workers.length];
    const idle = this.leastBusy();
    // Stay with the campaign's worker unless it is clearly busier than another.
    return preferred && preferred.queued <= idle.queued + 2 ? preferred : idle;
  }

  private leastBusy(): SummaryWorker {
    let best = this.workers[0];
    for (const worker of this.workers) if (best === undefined || worker.queued < best.queued) best = worker;
    if (!best) throw new Error("The summary service has no worker.");
    return best;
  }

  private remember(key: string, answer: SummaryAnswer): void {
    const previous = this.answers.get(key);
    if (previous !== undefined) {
      this.answers.delete(key);
      this.answerBytes -= answerBytes(key, previous);
    }
    // An answer larger than the whole bound is served but not kept.
    if (answerBytes(key, answer) > this.maxBytes) return;
    this.answers.set(key, answer);
    this.answerBytes += answerBytes(key, answer);
    for (const [oldKey, oldAnswer] of this.answers) {
      if (this.answerBytes <= this.maxBytes && this.answers.size <= this.maxEntries) break;
      this.answers.delete(oldKey);
      this.answerBytes -= answerBytes(oldKey, oldAnswer);
    }
  }

  /** GET …/summary: the summary of a campaign or of a site's visible campaigns (send it with sendAnswer). */
  summary(request: {
    kind: "campaign" | "site";
    site: SiteRow;
    campaigns: CampaignRow[];
    query: SummaryQuery;
    /** The campaigns' ingest rejections (store.uploads.ingestRejections), read only on a miss. */
    ingestRejections: () => Promise<IngestRejections>;
  }): Promise<SummaryAnswer> {
    const { kind, site, campaigns, query } = request;
    return this.compute("summary", {
      campaignIds: campaigns.map((campaign) => campaign.id),
      key: `${kind}|${scopeKey(site, campaigns)}|${queryKey(query)}`,
      input: async () => ({ kind, site, campaigns, query, ingestRejections: await request.ingestRejections() }),
    });
  }

  /** The site list's short summary of a site over these campaigns (default filters). */
  async brief(site: SiteRow, campaignIds: number[]): Promise<SiteSummaryBrief | null> {
    const answer = await this.compute("brief", { campaignIds, key: JSON.stringify([site.id, site.longitude]), input: () => ({ site, campaignIds }) });
    return JSON.parse(answer.body.toString("utf8")) as SiteSummaryBrief | null;
  }

  /** GET …/samples: the thinned sample series (send it with sendAnswer). */
  series(campaignIds: number[], longitudeDeg: number, query: SamplesQuery): Promise<SummaryAnswer> {
    return this.compute("series", {
      campaignIds,
      key: JSON.stringify([longitudeDeg, queryKey(query), query.night ?? null, query.maxPoints ?? null]),
      input: () => ({ campaignIds, longitudeDeg, query }),
    });
  }

  /**
   * The campaign's stored sample times in ascending order, read by a worker (a million rows are never read on the
   * main thread). Not cached: the upload wizard's whole-file check asks once per file.
   */
  async storedTimes(campaignId: number): Promise<Float64Array> {
    const { body } = await this.workerFor([campaignId]).run("storedTimes", { campaignId });
    // The transferred buffer starts at offset 0, so it is aligned for Float64Array.
    return new Float64Array(body.buffer, body.byteOffset, body.byteLength / Float64Array.BYTES_PER_ELEMENT);
  }

  stats(): SummaryServiceStats {
    return {
      ...this.counters,
      cachedAnswers: this.answers.size,
      cachedBytes: this.answerBytes,
      workerColumnBytes: this.workers.reduce((sum, worker) => sum + worker.columnBytes, 0),
    };
  }

  async close(): Promise<void> {
    await Promise.all(this.workers.map((worker) => worker.close()));
  }
}

/** Whether an Accept-Encoding header accepts gzip (a `gzip` or `*` token whose q is not 0). */
export function acceptsGzip(header: string | undefined): boolean {
  if (!header) return false;
  for (const part of header.split(",")) {
    const [token = "", ...params] = part.split(";");
    const name = token.trim().toLowerCase();
    if (name !== "gzip" && name !== "x-gzip" && name !== "*") continue;
    const q = params.map((param) => /^\s*q\s*=\s*([0-9.]+)\s*$/i.exec(param)?.[1]).find((value) => value !== undefined);
    return q === undefined || Number(q) > 0;
  }
  return false;
}

/**
 * Sends a cached answer as it is, gzip-compressed when the client accepts it: its ETag spares Express hashing the
 * body, and a client holding it gets 304.
 */
export function sendAnswer(req: Request, res: Response, answer: SummaryAnswer): void {
  res.setHeader("ETag", answer.etag);
  res.type("json");
  if (answer.gzipped) {
    res.setHeader("Vary", "Accept-Encoding");
    if (acceptsGzip(req.headers["accept-encoding"])) {
      res.setHeader("Content-Encoding", "gzip");
      res.send(answer.gzipped);
      return;
    }
  }
  res.send(answer.body);
}
