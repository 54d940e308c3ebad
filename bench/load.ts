// `npm run load`: the load test of issue 8. Starts a server in its own process on loopback with a temporary data
// directory, stores a site with 1 000 000 samples through the upload API, signs in, then for `--duration`
// seconds sends the repeated site summary over `--connections` connections (autocannon) while a second
// autocannon measures GET /api/health. Then the same while 1 000 000-row logs are ingested into other
// campaigns one after another. Prints requests/s, p50/p95/p99 and errors of each, the server's memory, and
// writes them under the `load` key of bench/results.json (`loadIdentity` with --identity). Loopback only; bounded in time and in ingests.
//
//   npm run load                                   # the full run (about 3 minutes)
//   npm run load -- --rows 5000 --duration 2 --connections 5 --out /tmp/load.json    # a smoke run
//   npm run load -- --identity                     # readers that do not accept gzip (every answer sent uncompressed)
//
// The readers send the Accept-Encoding a browser sends (gzip, deflate, br, zstd), so cached answers go out in gzip
// as they do to the web app; --identity measures the uncompressed case.
import { spawn } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { cpus, tmpdir, totalmem } from "node:os";
import { dirname, join, resolve } from "node:path";
import { fileURLToPath } from "node:url";
import { benchLog, freePort, peakRssMb, signInAsLead, uploadAndWait, waitForHealth } from "./ingest.ts";
import { serverCommand } from "../scripts/server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const serverDir = join(root, "apps/server");
const PASSWORD = "load-password-1";
const SITE = { latitude: -27.42, longitude: -70.15, elevationM: 2650 };
const MONITOR = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" as const };
/** Connections of the /api/health probe: a few, so it measures waiting, not its own load. */
const HEALTH_CONNECTIONS = 2;
/** Targets of issue 8, printed beside the figures. */
const TARGETS = { summaryRequestsPerS: 200, summaryP99Ms: 250, healthP99Ms: 50 };

interface Flags {
  rows: number;
  durationS: number;
  connections: number;
  maxIngests: number;
  out: string;
  /** Readers that accept no compression (Accept-Encoding: identity) instead of a browser's. */
  identity: boolean;
}

/** What Chromium sends: the readers of the load test are browsers. */
const BROWSER_ACCEPT_ENCODING = "gzip, deflate, br, zstd";

function parseFlags(argv: readonly string[]): Flags {
  const flags: Flags = { rows: 1_000_000, durationS: 30, connections: 50, maxIngests: 6, out: join(root, "bench", "results.json"), identity: false };
  for (let index = 0; index < argv.length; index += 2) {
    const flag = argv[index];
    if (flag === "--identity") {
      flags.identity = true;
      index -= 1;
      continue;
    }
    const value = argv[index + 1];
    const number = Number(value);
    if (flag === "--rows" && number >= 100) flags.rows = Math.floor(number);
    else if (flag === "--duration" && number >= 1 && number <= 120) flags.durationS = number;
    else if (flag === "--connections" && number >= 1 && number <= 200) flags.connections = Math.floor(number);
    else if (flag === "--max-ingests" && number >= 1 && number <= 20) flags.maxIngests = Math.floor(number);
    else if (flag === "--out" && value !== undefined) flags.out = resolve(value);
    else throw new Error(`load: unknown or out-of-range flag ${String(flag)} ${String(value)} (flags: --rows N≥100 --duration 1..120 s --connections 1..200 --max-ingests 1..20 --out FILE --identity)`);
  }
  return flags;
}

/** Resident memory now (VmRSS) of a process in MB; Linux only. */
function rssMb(pid: number): number {
  const match = /VmRSS:\s+(\d+)\s+kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
  return match ? Math.round(Number(match[1]) / 1024) : Number.NaN;
}

export interface LoadFigures {
  requestsPerS: number;
  requests: number;
  p50Ms: number;
  p95Ms: number;
  p99Ms: number;
  maxMs: number;
  errors: number;
  non2xx: number;
}

/**
 * Runs the summary and health measurements at the same moment, each in a process of its own (bench/hammer.mjs), so
 * they never share an event loop with each other or with this script: a health request's time is the server's.
 */
async function hammerBoth(summaryUrl: string, healthUrl: string, cookie: string, acceptEncoding: string, connections: number, durationS: number): Promise<[LoadFigures, LoadFigures]> {
  const startAtMs = Date.now() + 1000;
  const run = (url: string, runConnections: number) =>
    new Promise<LoadFigures>((resolvePromise, reject) => {
      const child = spawn(process.execPath, [join(root, "bench/hammer.mjs"), url, String(runConnections), String(durationS), String(startAtMs)], {
        cwd: root,
        env: { ...process.env, CALMCREST_LOAD_COOKIE: cookie, CALMCREST_LOAD_ACCEPT_ENCODING: acceptEncoding },
        stdio: ["ignore", "pipe", "inherit"],
      });
      const out: Buffer[] = [];
      child.stdout.on("data", (chunk: Buffer) => out.push(chunk));
      child.on("error", reject);
      child.on("close", (code) => {
        if (code !== 0) return reject(new Error(`bench/hammer.mjs exited with code ${String(code)}`));
        resolvePromise(JSON.parse(Buffer.concat(out).toString("utf8")) as LoadFigures);
      });
    });
  return Promise.all([run(summaryUrl, connections), run(healthUrl, HEALTH_CONNECTIONS)]);
}

function describe(name: string, figures: LoadFigures): string {
  return `${name.padEnd(30)} ${String(figures.requestsPerS).padStart(8)} req/s  p50 ${figures.p50Ms} ms  p95 ${figures.p95Ms} ms  p99 ${figures.p99Ms} ms  max ${figures.maxMs} ms  errors ${figures.errors}  non-2xx ${figures.non2xx}`;
}

export async function runLoad(flags: Flags): Promise<Record<string, unknown>> {
  const logPath = await benchLog(flags.rows);
  const dataDir = mkdtempSync(join(tmpdir(), "calmcrest-load-data-"));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  // One node process (tsx as a loader, not its CLI wrapper), so its /proc status is the server's own memory.
  // BENCH_PROF=<dir>: the server writes a CPU profile of each of its threads there (node --cpu-prof) when it stops.
  const server = spawn(process.execPath, [...(process.env.BENCH_PROF ? ["--cpu-prof", `--cpu-prof-dir=${process.env.BENCH_PROF}`] : []), ...serverCommand().args], {
    cwd: serverDir,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: "users", DEMO_PASSWORD: PASSWORD, NODE_ENV: "development" },
    stdio: ["ignore", "ignore", "inherit"],
  });
  const pid = server.pid ?? 0;
  try {
    await waitForHealth(base, server, 60_000);
    const { headers, postJson: post } = await signInAsLead(base, PASSWORD);
    // The site under load: one campaign with the whole log.
    const site = await post("/api/sites", { name: "Load Ridge", ...SITE });
    const campaign = await post(`/api/sites/${site.id}/campaigns`, { name: "Load campaign", monitor: MONITOR });
    const samplesStored = await uploadAndWait(base, headers, campaign.id, logPath, "load.csv");
    const summaryUrl = `${base}/api/sites/${site.id}/summary`;
    const coldStartMs = performance.now();
    const first = await fetch(summaryUrl, { headers });
    const summaryBytes = (await first.arrayBuffer()).byteLength;
    // The bytes on the wire for the readers' Accept-Encoding (fetch above inflated what it got).
    const acceptEncoding = flags.identity ? "identity" : BROWSER_ACCEPT_ENCODING;
    const sentBytes = Number((await fetch(summaryUrl, { method: "HEAD", headers: { ...headers, "Accept-Encoding": acceptEncoding } })).headers.get("content-length"));
    if (!first.ok) throw new Error(`summary: ${first.status}`);
    const summaryColdMs = Math.round(performance.now() - coldStartMs);
    console.log(`load: ${samplesStored} samples stored; first summary ${summaryColdMs} ms (${Math.round(summaryBytes / 1024)} KiB; ${Math.round(sentBytes / 1024)} KiB sent to readers accepting "${acceptEncoding}")`);

    console.log(`load: ${flags.connections} connections on the repeated summary and ${HEALTH_CONNECTIONS} on /api/health for ${flags.durationS} s…`);
    const [summary, health] = await hammerBoth(summaryUrl, `${base}/api/health`, headers.Cookie ?? "", acceptEncoding, flags.connections, flags.durationS);
    console.log(describe("repeated summary", summary));
    console.log(describe("/api/health", health));
    const rssAfterSummaryMb = rssMb(pid);

    // The same while logs are ingested: the same file into fresh campaigns of another site, one after another,
    // for the whole run (each is a new upload: the same bytes in another campaign are not a duplicate).
    const otherSite = await post("/api/sites", { name: "Load Saddle", ...SITE });
    let ingesting = true;
    let ingestsDone = 0;
    let ingestBusyMs = 0;
    const ingestLoop = (async () => {
      for (let count = 0; count < flags.maxIngests && ingesting; count += 1) {
        const target = await post(`/api/sites/${otherSite.id}/campaigns`, { name: `Ingest ${count + 1}`, monitor: MONITOR });
        const startedMs = performance.now();
        await uploadAndWait(base, headers, target.id, logPath, "load.csv");
        ingestBusyMs += performance.now() - startedMs;
        ingestsDone += 1;
      }
    })();
    // Let the first ingest start before measuring.
    await new Promise((resolveWait) => setTimeout(resolveWait, 300));
    console.log(`load: the same during ${flags.rows}-row ingests…`);
    const loadStartMs = performance.now();
    const [summaryDuringIngest, healthDuringIngest] = await hammerBoth(summaryUrl, `${base}/api/health`, headers.Cookie ?? "", acceptEncoding, flags.connections, flags.durationS);
    const loadMs = performance.now() - loadStartMs;
    ingesting = false;
    await ingestLoop;
    console.log(describe("repeated summary, ingesting", summaryDuringIngest));
    console.log(describe("/api/health, ingesting", healthDuringIngest));
    console.log(`load: ${ingestsDone} ingest(s) of ${flags.rows} rows finished, about ${Math.round(ingestBusyMs / 1000)} s of ingest against ${Math.round(loadMs / 1000)} s measured`);

    // Memory with several campaigns of samples held: a summary of each of them (loads their columns in the worker).
    const campaigns = (await (await fetch(`${base}/api/sites/${otherSite.id}`, { headers })).json()) as { campaigns: { id: number }[] };
    for (const each of campaigns.campaigns) await (await fetch(`${base}/api/campaigns/${each.id}/summary`, { headers })).arrayBuffer();
    await (await fetch(`${base}/api/sites/${otherSite.id}/summary`, { headers })).arrayBuffer();
    const rssAfterAllMb = rssMb(pid);

    const meets = (figures: LoadFigures) => figures.requestsPerS >= TARGETS.summaryRequestsPerS && figures.p99Ms <= TARGETS.summaryP99Ms && figures.errors + figures.non2xx === 0;
    const result = {
      date: new Date().toISOString(),
      machine: { cpu: cpus()[0]?.model ?? "unknown", cores: cpus().length, memoryGb: Number((totalmem() / 2 ** 30).toFixed(1)), node: process.version },
      rows: flags.rows,
      samplesStored,
      connections: flags.connections,
      healthConnections: HEALTH_CONNECTIONS,
      durationS: flags.durationS,
      summaryColdMs,
      summaryKiB: Math.round(summaryBytes / 1024),
      acceptEncoding,
      summarySentKiB: Math.round(sentBytes / 1024),
      summary,
      health,
      summaryDuringIngest,
      healthDuringIngest,
      ingestsDuringLoad: ingestsDone,
      ingestBusyS: Math.round(ingestBusyMs / 100) / 10,
      campaignsOfSamples: 1 + ingestsDone,
      serverRssAfterSummaryMb: rssAfterSummaryMb,
      serverRssAfterAllCampaignsMb: rssAfterAllMb,
      serverPeakRssMb: Math.round(peakRssMb(pid)),
      targets: TARGETS,
      targetsMet: {
        summary: meets(summary),
        summaryDuringIngest: meets(summaryDuringIngest),
        health: health.p99Ms <= TARGETS.healthP99Ms && health.errors + health.non2xx === 0,
        healthDuringIngest: healthDuringIngest.p99Ms <= TARGETS.healthP99Ms && healthDuringIngest.errors + healthDuringIngest.non2xx === 0,
      },
    };
    console.log(`load: server memory ${rssAfterSummaryMb} MB after the summary run, ${rssAfterAllMb} MB with ${1 + ingestsDone} campaigns of samples summarised, peak ${result.serverPeakRssMb} MB`);
    console.log(`load: targets met: ${JSON.stringify(result.targetsMet)}`);
    return result;
  } finally {
    server.kill("SIGTERM");
    await new Promise((resolveExit) => server.once("exit", resolveExit));
    rmSync(dataDir, { recursive: true, force: true });
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const flags = parseFlags(process.argv.slice(2));
  const result = await runLoad(flags);
  // bench/results.json keeps the other benchmarks' figures; the load test owns its `load` key (`loadIdentity` for
  // readers that accept no compression).
  const key = flags.identity ? "loadIdentity" : "load";
  const previous: Record<string, unknown> = existsSync(flags.out) ? (JSON.parse(readFileSync(flags.out, "utf8")) as Record<string, unknown>) : {};
  writeFileSync(flags.out, `${JSON.stringify({ ...previous, [key]: result }, null, 2)}\n`);
  console.log(`written: ${flags.out} (key "${key}")`);
}
