// Benchmark at survey scale (issue 15): ten invented sites with `rows` stored samples each (10 million at the
// default 1 000 000) in one database, loaded through the upload API (the bench log of bench/ingest.ts uploaded to
// each site's campaign: the same samples, ten campaigns). Then a fresh server process (a restart) is asked, as a
// person browsing would: the map (GET /api/sites with every site's short summary), then every site page (the
// site, its summary, its sample series), each summary again (warm), a 4-site comparison and again (warm), and its
// resident memory after all of that. Also the disk the samples take. Run through bench/run.ts
// (`npm run bench -- --only survey`), or alone: node_modules/.bin/tsx bench/survey.ts [rows].
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { median } from "./childProcess.ts";
import { processCpuMs, waitForSnapshots } from "./compare.ts";
import { benchLog, freePort, peakRssMb, signInAsLead, uploadAndWait, waitForHealth } from "./ingest.ts";
import { serverCommand } from "../scripts/server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const serverDir = join(root, "apps/server");
const PASSWORD = "bench-password-1";
const SITES = 10;
const MONITOR = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" as const };

function startServer(dataDir: string, port: number): ChildProcess {
  // One node process (tsx as a loader), so its /proc status is the server's own memory.
  return spawn(process.execPath, serverCommand().args, {
    cwd: serverDir,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: "users", DEMO_PASSWORD: PASSWORD, NODE_ENV: "development" },
    stdio: ["ignore", "ignore", "inherit"],
  });
}

async function stopServer(server: ChildProcess): Promise<void> {
  if (server.exitCode !== null || server.signalCode !== null) return;
  const exited = new Promise((resolve) => server.once("exit", resolve));
  server.kill("SIGTERM");
  await exited;
}

/** Resident memory of a process now, in MB (VmRSS from /proc; Linux only). */
function rssMb(pid: number): number {
  const match = /VmRSS:\s+(\d+)\s+kB/.exec(readFileSync(`/proc/${pid}/status`, "utf8"));
  return match ? Number(match[1]) / 1024 : Number.NaN;
}

/** Bytes of the files directly in a directory whose names start with `prefix` (0 when none). */
function bytesOf(directory: string, prefix = ""): number {
  try {
    return readdirSync(directory)
      .filter((name) => name.startsWith(prefix))
      .reduce((sum, name) => sum + statSync(join(directory, name)).size, 0);
  } catch {
    return 0;
  }
}

/** Ten sites with a campaign each, the bench log uploaded to every campaign; waits for each ingest and its column snapshot. */
async function loadSites(base: string, rows: number): Promise<{ siteIds: number[]; campaignIds: number[]; stored: number; ingestS: number[] }> {
  const logPath = await benchLog(rows);
  const { headers, postJson: json } = await signInAsLead(base, PASSWORD);
  const siteIds: number[] = [];
  const campaignIds: number[] = [];
  const ingestS: number[] = [];
  let stored = 0;
  for (let index = 0; index < SITES; index += 1) {
    // Invented ridges a few kilometres apart.
    const site = await json("/api/sites", { name: `Survey Ridge ${index + 1}`, latitude: -27.4 - index * 0.03, longitude: -70.1 - index * 0.02, elevationM: 2500 + index * 20 });
    const campaign = await json(`/api/sites/${site.id}/campaigns`, { name: `Survey Ridge ${index + 1} mast`, monitor: MONITOR });
    const startedMs = performance.now();
    stored += await uploadAndWait(base, headers, campaign.id, logPath, `survey-${index + 1}.csv`);
    ingestS.push((performance.now() - startedMs) / 1000);
    siteIds.push(site.id);
    campaignIds.push(campaign.id);
  }
  return { siteIds, campaignIds, stored, ingestS };
}

async function timedGet(base: string, path: string, headers: Record<string, string>): Promise<{ ms: number; body: unknown }> {
  const begin = performance.now();
  const response = await fetch(`${base}${path}`, { headers });
  if (!response.ok) throw new Error(`${path}: ${response.status} ${await response.text()}`);
  const body: unknown = await response.json();
  return { ms: performance.now() - begin, body };
}

/**
 * With `keepDataDir` (CALMCREST_BENCH_SURVEY_DATA_DIR) the loaded data directory is kept there and reused by the
 * next run with the same rows (what was loaded is kept in bench-survey.json beside the database).
 */
export async function run({ rows, keepDataDir = process.env.CALMCREST_BENCH_SURVEY_DATA_DIR }: { rows: number; runs?: number; keepDataDir?: string }): Promise<Record<string, number | string>> {
  const dataDir = keepDataDir ?? mkdtempSync(join(tmpdir(), "calmcrest-bench-survey-"));
  const loadedFile = join(dataDir, "bench-survey.json");
  try {
    let loaded: (Awaited<ReturnType<typeof loadSites>> & { rows?: number }) | null = null;
    if (keepDataDir !== undefined && existsSync(loadedFile)) {
      const kept = JSON.parse(readFileSync(loadedFile, "utf8")) as Awaited<ReturnType<typeof loadSites>> & { rows?: number };
      if (kept.rows === rows) loaded = kept;
      else rmSync(dataDir, { recursive: true, force: true });
    }
    if (loaded === null) {
      mkdirSync(dataDir, { recursive: true });
      const loadPort = await freePort();
      const loader = startServer(dataDir, loadPort);
      try {
        await waitForHealth(`http://127.0.0.1:${loadPort}`, loader, 60_000);
        loaded = { ...(await loadSites(`http://127.0.0.1:${loadPort}`, rows)), rows };
        await waitForSnapshots(dataDir, loaded.campaignIds, 300_000);
      } finally {
        await stopServer(loader);
      }
      if (keepDataDir !== undefined) writeFileSync(loadedFile, JSON.stringify(loaded));
    }
    const sites = loaded;
    const databaseBytes = bytesOf(dataDir, "calmcrest.sqlite");
    const snapshotBytes = bytesOf(join(dataDir, "cache", "columns"), "campaign-");

    // A restart: a fresh process, nothing of the samples in memory; the clock starts at the spawn.
    const port = await freePort();
    const base = `http://127.0.0.1:${port}`;
    const spawnedMs = performance.now();
    const server = startServer(dataDir, port);
    try {
      await waitForHealth(base, server, 60_000);
      const readyMs = performance.now() - spawnedMs;
      const { headers } = await signInAsLead(base, PASSWORD);
      const pid = server.pid ?? 0;
      const cpuBeforeMap = processCpuMs(pid);
      const map = await timedGet(base, "/api/sites", headers);
      const mapCpuMs = processCpuMs(pid) - cpuBeforeMap;
      const mapSinceSpawnMs = performance.now() - spawnedMs;
      const listed = map.body as { id: number; summary: { samples: number } | null }[];
      const withSummary = listed.filter((site) => sites.siteIds.includes(site.id) && site.summary !== null).length;
      const mapWarm = await timedGet(base, "/api/sites", headers);
      // Every site page as the web app opens it: the site, its summary, its sample series.
      const firstSummaryMs: number[] = [];
      const firstSeriesMs: number[] = [];
      const firstSummaryCpuMs: number[] = [];
      for (const siteId of sites.siteIds) {
        await timedGet(base, `/api/sites/${siteId}`, headers);
        const cpuBefore = processCpuMs(pid);
        firstSummaryMs.push((await timedGet(base, `/api/sites/${siteId}/summary`, headers)).ms);
        firstSummaryCpuMs.push(processCpuMs(pid) - cpuBefore);
        firstSeriesMs.push((await timedGet(base, `/api/sites/${siteId}/samples`, headers)).ms);
      }
      const rssAfterPagesMb = rssMb(server.pid ?? 0);
      const warmSummaryMs: number[] = [];
      for (let round = 0; round < 3; round += 1) for (const siteId of sites.siteIds) warmSummaryMs.push((await timedGet(base, `/api/sites/${siteId}/summary`, headers)).ms);
      const four = sites.siteIds.slice(0, 4).join(",");
      const cpuBeforeComparison = processCpuMs(pid);
      const comparisonFirst = await timedGet(base, `/api/comparisons?sites=${four}`, headers);
      const comparisonCpuMs = processCpuMs(pid) - cpuBeforeComparison;
      const comparisonWarm: number[] = [];
      for (let index = 0; index < 5; index += 1) comparisonWarm.push((await timedGet(base, `/api/comparisons?sites=${four}`, headers)).ms);
      const rssEndMb = rssMb(server.pid ?? 0);
      const storedSamples = sites.stored;
      return {
        sites: SITES,
        storedSamplesPerSite: Math.round(storedSamples / SITES),
        storedSamplesTotal: storedSamples,
        ingestMedianS: Math.round(median(sites.ingestS) * 100) / 100,
        databaseMb: Math.round(databaseBytes / 2 ** 20),
        databaseBytesPerSample: Math.round(databaseBytes / storedSamples),
        snapshotsMb: Math.round(snapshotBytes / 2 ** 20),
        snapshotBytesPerSample: Math.round(snapshotBytes / storedSamples),
        restartToHealthyMs: Math.round(readyMs),
        mapFirstAnswerMs: Math.round(map.ms),
        mapFirstAnswerServerCpuMs: mapCpuMs,
        mapFirstAnswerSinceSpawnMs: Math.round(mapSinceSpawnMs),
        mapSitesWithSummary: withSummary,
        mapWarmMs: Math.round(mapWarm.ms),
        siteSummaryFirstMaxMs: Math.round(Math.max(...firstSummaryMs)),
        siteSummaryFirstMedianMs: Math.round(median(firstSummaryMs)),
        siteSummaryFirstServerCpuMedianMs: median(firstSummaryCpuMs),
        siteSeriesFirstMaxMs: Math.round(Math.max(...firstSeriesMs)),
        siteSummaryWarmMaxMs: Math.round(Math.max(...warmSummaryMs)),
        siteSummaryWarmMedianMs: Math.round(median(warmSummaryMs)),
        comparison4FirstMs: Math.round(comparisonFirst.ms),
        comparison4FirstServerCpuMs: comparisonCpuMs,
        comparison4WarmMedianMs: Math.round(median(comparisonWarm)),
        serverRssAfterMapAndPagesMb: Math.round(rssAfterPagesMb),
        serverRssEndMb: Math.round(rssEndMb),
        serverPeakRssMb: Math.round(peakRssMb(server.pid ?? 0)),
        loadAverage1Min: Number(loadavg()[0]?.toFixed(1)),
        runAt: new Date().toISOString(),
      };
    } finally {
      await stopServer(server);
    }
  } finally {
    if (keepDataDir === undefined) rmSync(dataDir, { recursive: true, force: true });
  }
}

// Run alone: node_modules/.bin/tsx bench/survey.ts [rows]
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  console.log(await run({ rows: Number(process.argv[2] ?? 1_000_000) }));
}
