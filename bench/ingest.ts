// Benchmark of the server's ingest and summary paths (issue 4, Performance): a seeded native-format log through
// the upload API of a real server process, from request to status `done`, with the server's peak memory; then
// the site summary over the stored samples, cold and warm. Run through bench/run.ts (`npm run bench`).
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, openAsBlob, readFileSync, rmSync, statSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { writeSyntheticLog } from "../packages/seeing-stats/src/node/index.js";
import { serverCommand } from "../scripts/server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const serverDir = join(root, "apps/server");
const PASSWORD = "bench-password-1";
// The invented site and monitor of bench/analyzer.ts, so both benchmarks read the same log the same way.
const SITE = { latitudeDeg: -27.42, longitudeDeg: -70.15, elevationM: 2650 };
const SEED = 20_250_301;
const MONITOR = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" as const };

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once("error", reject);
    probe.listen(0, "127.0.0.1", () => {
      const address = probe.address();
      const port = typeof address === "object" && address ? address.port : 0;
      probe.close(() => resolve(port));
    });
  });
}

/**
 * The seeded bench log in the native format: the same file bench/analyzer.ts analyses (same seed, site, monitor
 * and options, so whichever benchmark runs first writes it and the other reuses it).
 */
export async function benchLog(rows: number): Promise<string> {
  const outDir = join(root, "bench", "out");
  mkdirSync(outDir, { recursive: true });
  const path = join(outDir, `native-${rows}-rows-seed-${SEED}-from-2018.csv`);
  if (existsSync(path) && statSync(path).size > 0) return path;
  const nights = Math.ceil(rows / 300) + 30;
  const written = await writeSyntheticLog(path, { seed: SEED, site: SITE, startDate: "2018-01-01", nights, medianSeeingArcsec: 0.75, monitor: MONITOR, badRowEvery: 997, maxRows: rows });
  if (written.rows !== rows) throw new Error(`the synthetic log has ${written.rows} rows, wanted ${rows}`);
  return path;
}

/** CPU time a process has used so far (user + system, all its threads), in seconds (/proc; Linux only). */
export function cpuSeconds(pid: number): number {
  const fields = readFileSync(`/proc/${pid}/stat`, "utf8").replace(/^.*\) /s, "").split(" ");
  // utime and stime are fields 14 and 15 of /proc/PID/stat (11 and 12 after the command name), in clock ticks (100 a second on Linux).
  return (Number(fields[11]) + Number(fields[12])) / 100;
}

/** Peak resident memory of a process in MB (VmHWM from /proc; Linux only). */
export function peakRssMb(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, "utf8");
  const match = /VmHWM:\s+(\d+)\s+kB/.exec(status);
  return match ? Number(match[1]) / 1024 : Number.NaN;
}

function median(values: number[]): number {
  const sorted = [...values].sort((left, right) => left - right);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? (sorted[middle] ?? Number.NaN) : ((sorted[middle - 1] ?? 0) + (sorted[middle] ?? 0)) / 2;
}

export async function waitForHealth(base: string, server: ChildProcess, timeoutMs: number): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`the server exited with code ${server.exitCode}`);
    try {
      const response = await fetch(`${base}/api/health`);
      if (response.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error("the server did not start in time");
}

/** Signs in as the demo survey lead; gives the request headers (Origin, session cookie) and a JSON POST that expects 2xx. */
export async function signInAsLead(base: string, password: string): Promise<{ headers: Record<string, string>; postJson: (path: string, body: unknown) => Promise<{ id: number }> }> {
  const signIn = await fetch(`${base}/api/auth/sign-in`, {
    method: "POST",
    headers: { Origin: base, "Content-Type": "application/json" },
    body: JSON.stringify({ email: "lead@calmcrest.test", password }),
  });
  if (!signIn.ok) throw new Error(`sign-in failed: ${signIn.status}`);
  const headers = { Origin: base, Cookie: (signIn.headers.get("set-cookie") ?? "").split(";")[0] ?? "" };
  const postJson = async (path: string, body: unknown) => {
    const response = await fetch(`${base}${path}`, { method: "POST", headers: { ...headers, "Content-Type": "application/json" }, body: JSON.stringify(body) });
    if (!response.ok) throw new Error(`${path}: ${response.status} ${await response.text()}`);
    return (await response.json()) as { id: number };
  };
  return { headers, postJson };
}

/**
 * Sends a log to a campaign through the upload API and waits (polling every 50 ms) until its ingest is `done`;
 * returns the samples it accepted. Any other end (failed, a refusal) throws with the server's words.
 */
export async function uploadAndWait(base: string, headers: Record<string, string>, campaignId: number, logPath: string, fileName: string): Promise<number> {
  const form = new FormData();
  form.append("file", await openAsBlob(logPath), fileName);
  const posted = await fetch(`${base}/api/campaigns/${campaignId}/uploads`, { method: "POST", headers, body: form });
  if (posted.status !== 202) throw new Error(`upload: ${posted.status} ${await posted.text()}`);
  const { upload } = (await posted.json()) as { upload: { id: number } };
  for (;;) {
    const status = (await (await fetch(`${base}/api/uploads/${upload.id}`, { headers })).json()) as { status: string; samples: { accepted: number }; error: string | null };
    if (status.status === "done") return status.samples.accepted;
    if (status.status !== "queued" && status.status !== "ingesting") throw new Error(`ingest ended ${status.status}: ${status.error ?? ""}`);
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
}

export async function run({ rows }: { rows: number; runs?: number }): Promise<Record<string, number | string>> {
  const logPath = await benchLog(rows);
  const dataDir = mkdtempSync(join(tmpdir(), "calmcrest-bench-data-"));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  // One node process (tsx as a loader, not its CLI wrapper), so its /proc status is the server's own memory.
  const server = spawn(process.execPath, [...(process.env.BENCH_PROF ? ["--cpu-prof", `--cpu-prof-dir=${process.env.BENCH_PROF}`] : []), ...serverCommand().args], {
    cwd: serverDir,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: "users", DEMO_PASSWORD: PASSWORD, NODE_ENV: "development" },
    stdio: ["ignore", "ignore", "inherit"],
  });
  try {
    await waitForHealth(base, server, 30_000);
    const { headers, postJson: json } = await signInAsLead(base, PASSWORD);
    const site = await json("/api/sites", { name: "Bench Ridge", latitude: SITE.latitudeDeg, longitude: SITE.longitudeDeg, elevationM: SITE.elevationM });
    const campaign = await json(`/api/sites/${site.id}/campaigns`, { name: "Bench campaign", monitor: MONITOR });

    const form = new FormData();
    form.append("file", await openAsBlob(logPath), "bench.csv");
    const startedMs = performance.now();
    const cpuBeforeS = cpuSeconds(server.pid ?? 0);
    const posted = await fetch(`${base}/api/campaigns/${campaign.id}/uploads`, { method: "POST", headers, body: form });
    if (posted.status !== 202) throw new Error(`upload: ${posted.status} ${await posted.text()}`);
    const { upload } = (await posted.json()) as { upload: { id: number } };
    let status: { status: string; samples: { accepted: number; read: number }; error: string | null };
    for (;;) {
      status = (await (await fetch(`${base}/api/uploads/${upload.id}`, { headers })).json()) as typeof status;
      if (status.status !== "queued" && status.status !== "ingesting") break;
      await new Promise((resolve) => setTimeout(resolve, 20));
    }
    const ingestSeconds = (performance.now() - startedMs) / 1000;
    const ingestCpuS = cpuSeconds(server.pid ?? 0) - cpuBeforeS;
    if (status.status !== "done") throw new Error(`ingest ended ${status.status}: ${status.error ?? ""}`);
    const peakMb = peakRssMb(server.pid ?? 0);

    const summaryMs = async () => {
      const begin = performance.now();
      const response = await fetch(`${base}/api/sites/${site.id}/summary`, { headers });
      if (!response.ok) throw new Error(`summary: ${response.status}`);
      await response.arrayBuffer();
      return performance.now() - begin;
    };
    const coldMs = await summaryMs();
    const warm: number[] = [];
    for (let index = 0; index < 5; index += 1) warm.push(await summaryMs());

    return {
      ingestRows: status.samples.read,
      ingestSamplesStored: status.samples.accepted,
      ingestFileMb: Math.round((statSync(logPath).size / 1024 / 1024) * 10) / 10,
      ingestRequestToDoneS: Math.round(ingestSeconds * 100) / 100,
      // The server's CPU time over the same span (all threads): steadier than the wall time on a shared machine.
      ingestServerCpuS: Math.round(ingestCpuS * 100) / 100,
      ingestServerPeakRssMb: Math.round(peakMb),
      siteSummaryColdMs: Math.round(coldMs),
      siteSummaryWarmMedianMs: Math.round(median(warm)),
    };
  } finally {
    server.kill("SIGTERM");
    await new Promise((resolve) => server.once("exit", resolve));
    rmSync(dataDir, { recursive: true, force: true });
  }
}

// Run alone: node_modules/.bin/tsx bench/ingest.ts [rows]
if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const rows = Number(process.argv[2] ?? 1_000_000);
  console.log(await run({ rows }));
}
