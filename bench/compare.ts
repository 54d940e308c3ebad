// Benchmark of the site comparison (issue 10): four invented ridges with `rows` stored samples each, through the
// upload API of a real server process; then fresh server processes on the same data answer GET /api/comparisons
// for the four: cold three ways (see run()), warm (the same comparison again, median of 5: the server keeps finished
// comparisons until data changes) and recomputed (columns in memory but a comparison not asked before: another
// outer scale each time, median of 3).
// Run through bench/run.ts (`npm run bench -- --only compare`).
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { writeSyntheticLog } from "../packages/seeing-stats/src/node/index.js";
import { median } from "./childProcess.ts";
import { columnSnapshotDir, snapshotVersion } from "../apps/server/src/summaries/column-snapshot.server.ts";
import { freePort, peakRssMb, signInAsLead, uploadAndWait, waitForHealth } from "./ingest.ts";
import { serverCommand } from "../scripts/server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const serverDir = join(root, "apps/server");
const PASSWORD = "bench-password-1";
const MONITOR = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" as const };
// Four invented ridges a few kilometres apart (same night sky, so their logs share nights), different seeing.
const RIDGES = [
  { name: "Bench Ridge A", latitudeDeg: -27.42, longitudeDeg: -70.15, elevationM: 2650, medianSeeingArcsec: 0.68, seed: 20_261_001 },
  { name: "Bench Ridge B", latitudeDeg: -27.48, longitudeDeg: -70.21, elevationM: 2580, medianSeeingArcsec: 0.75, seed: 20_261_002 },
  { name: "Bench Ridge C", latitudeDeg: -27.36, longitudeDeg: -70.09, elevationM: 2710, medianSeeingArcsec: 0.82, seed: 20_261_003 },
  { name: "Bench Ridge D", latitudeDeg: -27.53, longitudeDeg: -70.02, elevationM: 2490, medianSeeingArcsec: 0.9, seed: 20_261_004 },
];

/** A ridge's seeded log with `rows` rows (written once under bench/out, then reused). */
async function ridgeLog(ridge: (typeof RIDGES)[number], rows: number): Promise<string> {
  const outDir = join(root, "bench", "out");
  mkdirSync(outDir, { recursive: true });
  const path = join(outDir, `compare-${rows}-rows-seed-${ridge.seed}.csv`);
  if (existsSync(path) && statSync(path).size > 0) return path;
  const nights = Math.ceil(rows / 300) + 30;
  await writeSyntheticLog(path, {
    seed: ridge.seed,
    site: { latitudeDeg: ridge.latitudeDeg, longitudeDeg: ridge.longitudeDeg, elevationM: ridge.elevationM },
    startDate: "2018-01-01",
    nights,
    medianSeeingArcsec: ridge.medianSeeingArcsec,
    monitor: MONITOR,
    maxRows: rows,
  });
  return path;
}

/** CPU time (user + system, all threads) the process has used so far, in ms, from /proc (clock ticks of 10 ms). */
export function processCpuMs(pid: number): number {
  const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
  const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
  // After the command name: state is field 3, utime field 14 and stime field 15 (1-based, proc(5)).
  return (Number(fields[11]) + Number(fields[12])) * 10;
}

function startServer(dataDir: string, port: number): ChildProcess {
  // One node process (tsx as a loader), so its /proc status is the server's own memory.
  return spawn(process.execPath, serverCommand().args, {
    cwd: serverDir,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: "users", DEMO_PASSWORD: PASSWORD, NODE_ENV: "development" },
    stdio: ["ignore", "ignore", "inherit"],
  });
}

export async function stopServer(server: ChildProcess): Promise<void> {
  // Already gone (exited, or ended by a signal): nothing to wait for.
  if (server.exitCode !== null || server.signalCode !== null) return;
  const exited = new Promise((resolve) => server.once("exit", resolve));
  server.kill("SIGTERM");
  await exited;
}

/** Creates the four ridges with a campaign each and uploads their logs; returns the site ids and samples stored. */
async function loadRidges(base: string, rows: number): Promise<{ siteIds: number[]; campaignIds: number[]; stored: number }> {
  const { headers, postJson: json } = await signInAsLead(base, PASSWORD);
  const siteIds: number[] = [];
  const campaignIds: number[] = [];
  let stored = 0;
  for (const ridge of RIDGES) {
    const logPath = await ridgeLog(ridge, rows);
    const site = await json("/api/sites", { name: ridge.name, latitude: ridge.latitudeDeg, longitude: ridge.longitudeDeg, elevationM: ridge.elevationM });
    const campaign = await json(`/api/sites/${site.id}/campaigns`, { name: `${ridge.name} mast`, monitor: MONITOR });
    stored += await uploadAndWait(base, headers, campaign.id, logPath, `${ridge.name}.csv`);
    siteIds.push(site.id);
    campaignIds.push(campaign.id);
  }
  return { siteIds, campaignIds, stored };
}

/** Waits until the ingest worker has written each campaign's column snapshot (it does so just after an ingest commits). */
export async function waitForSnapshots(dataDir: string, campaignIds: readonly number[], timeoutMs = 120_000): Promise<void> {
  const directory = columnSnapshotDir(join(dataDir, "calmcrest.sqlite"));
  const startedMs = performance.now();
  while (campaignIds.some((campaignId) => snapshotVersion(directory, campaignId) === null)) {
    if (performance.now() - startedMs > timeoutMs) throw new Error(`no column snapshot after ingest for campaigns ${campaignIds.join(", ")} within ${timeoutMs} ms`);
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}

/** A fresh server process on the data directory: its first comparison of the four (wall and server CPU), then optionally warm and not-asked-before ones. */
async function freshServerComparison(dataDir: string, siteIds: number[], options: { more: boolean }): Promise<Record<string, number | string>> {
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const server = startServer(dataDir, port);
  try {
    await waitForHealth(base, server, 60_000);
    const { headers } = await signInAsLead(base, PASSWORD);
    let commonNights = 0;
    let verdicts = "";
    const compareMs = async (extra = "") => {
      const begin = performance.now();
      const response = await fetch(`${base}/api/comparisons?sites=${siteIds.join(",")}${extra}`, { headers });
      if (!response.ok) throw new Error(`comparison: ${response.status} ${await response.text()}`);
      const body = (await response.json()) as { pairs: { paired: { commonNights: number; verdict: string | null } | null }[] };
      const elapsedMs = performance.now() - begin;
      commonNights = Math.min(...body.pairs.map((pair) => pair.paired?.commonNights ?? 0));
      verdicts = body.pairs.map((pair) => pair.paired?.verdict ?? "none").join(",");
      return elapsedMs;
    };
    // The server's own CPU time beside each wall time: on a shared machine the wall time also holds other processes' turns.
    const cpuBefore = processCpuMs(server.pid ?? 0);
    const coldMs = await compareMs();
    const result: Record<string, number | string> = { coldMs: Math.round(coldMs), coldServerCpuMs: processCpuMs(server.pid ?? 0) - cpuBefore, fewestCommonNights: commonNights, verdicts };
    if (!options.more) return result;
    const warm: number[] = [];
    for (let index = 0; index < 5; index += 1) warm.push(await compareMs());
    const recomputed: number[] = [];
    const recomputedCpu: number[] = [];
    for (const outerScaleM of [26, 27, 28]) {
      const before = processCpuMs(server.pid ?? 0);
      recomputed.push(await compareMs(`&outerScaleM=${outerScaleM}`));
      recomputedCpu.push(processCpuMs(server.pid ?? 0) - before);
    }
    return {
      ...result,
      warmMedianMs: Math.round(median(warm)),
      recomputedMedianMs: Math.round(median(recomputed)),
      recomputedServerCpuMedianMs: median(recomputedCpu),
      serverPeakRssMb: Math.round(peakRssMb(server.pid ?? 0)),
    };
  } finally {
    await stopServer(server);
  }
}

/**
 * Runs the comparison benchmark. "Cold" is always a fresh server process (started, healthy, a lead signed in) and
 * its first request, with nothing of the samples in its memory; three cold figures differ in what is on disk:
 * after ingest (the column snapshots the ingest worker wrote when each upload committed, as in normal use), with
 * no snapshot files at all (data/cache removed: every row read through SQLite), and after a restart (the snapshots
 * the previous process's summary workers wrote). With `keepDataDir` (CALMCREST_BENCH_COMPARE_DATA_DIR) the loaded
 * data directory is kept there and reused by the next run with the same rows (the ridges' ids and stored count are
 * kept in bench-compare.json beside the database); its "after ingest" figure then reads the snapshots the last
 * run's workers left (the same files, written by another process).
 */
export async function run({ rows, keepDataDir = process.env.CALMCREST_BENCH_COMPARE_DATA_DIR }: { rows: number; runs?: number; keepDataDir?: string }): Promise<Record<string, number | string>> {
  const dataDir = keepDataDir ?? mkdtempSync(join(tmpdir(), "calmcrest-bench-compare-"));
  const loadedFile = join(dataDir, "bench-compare.json");
  try {
    let loaded: { siteIds: number[]; campaignIds: number[]; stored: number; rows?: number } | null = null;
    if (keepDataDir !== undefined && existsSync(loadedFile)) {
      const kept = JSON.parse(readFileSync(loadedFile, "utf8")) as { siteIds: number[]; campaignIds?: number[]; stored: number; rows?: number };
      if (kept.rows === rows && kept.campaignIds !== undefined) loaded = { ...kept, campaignIds: kept.campaignIds };
      else rmSync(dataDir, { recursive: true, force: true });
    }
    if (loaded === null) {
      mkdirSync(dataDir, { recursive: true });
      const loadPort = await freePort();
      const loader = startServer(dataDir, loadPort);
      try {
        await waitForHealth(`http://127.0.0.1:${loadPort}`, loader, 60_000);
        loaded = { ...(await loadRidges(`http://127.0.0.1:${loadPort}`, rows)), rows };
        await waitForSnapshots(dataDir, loaded.campaignIds);
      } finally {
        await stopServer(loader);
      }
      if (keepDataDir !== undefined) writeFileSync(loadedFile, JSON.stringify(loaded));
    }
    const afterIngest = await freshServerComparison(dataDir, loaded.siteIds, { more: true });
    // No snapshot files at all: every row read through better-sqlite3.
    rmSync(join(dataDir, "cache"), { recursive: true, force: true });
    const noSnapshots = await freshServerComparison(dataDir, loaded.siteIds, { more: false });
    // The previous process's workers wrote the snapshots when they read the rows.
    const afterRestart = await freshServerComparison(dataDir, loaded.siteIds, { more: false });
    return {
      sites: RIDGES.length,
      storedSamplesPerSite: Math.round(loaded.stored / RIDGES.length),
      storedSamplesTotal: loaded.stored,
      fewestCommonNights: afterIngest.fewestCommonNights ?? 0,
      verdicts: afterIngest.verdicts ?? "",
      comparisonColdAfterIngestMs: afterIngest.coldMs ?? 0,
      comparisonColdAfterIngestServerCpuMs: afterIngest.coldServerCpuMs ?? 0,
      comparisonColdNoSnapshotsMs: noSnapshots.coldMs ?? 0,
      comparisonColdNoSnapshotsServerCpuMs: noSnapshots.coldServerCpuMs ?? 0,
      comparisonColdAfterRestartMs: afterRestart.coldMs ?? 0,
      comparisonColdAfterRestartServerCpuMs: afterRestart.coldServerCpuMs ?? 0,
      comparisonWarmMedianMs: afterIngest.warmMedianMs ?? 0,
      comparisonRecomputedMedianMs: afterIngest.recomputedMedianMs ?? 0,
      comparisonRecomputedServerCpuMedianMs: afterIngest.recomputedServerCpuMedianMs ?? 0,
      serverPeakRssMb: afterIngest.serverPeakRssMb ?? 0,
      loadAverage1Min: Number(loadavg()[0]?.toFixed(1)),
      runAt: new Date().toISOString(),
    };
  } finally {
    if (keepDataDir === undefined) rmSync(dataDir, { recursive: true, force: true });
  }
}

// Run alone: node_modules/.bin/tsx bench/compare.ts [rows]
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const rows = Number(process.argv[2] ?? 1_000_000);
  console.log(await run({ rows }));
}
