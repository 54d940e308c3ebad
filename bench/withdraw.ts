// Benchmark of the undo actions on a large upload (issue 8: "no main-thread call may block on SQLite for more than a
// few ms"): the seeded bench log is stored through the upload API of a real server process, then withdrawn,
// restored and re-read while a probe asks GET /api/health every few milliseconds from this process. Each action
// reports how long its request took and the longest /api/health answer meanwhile (the time the server's event
// loop could not answer). Run through bench/run.ts (`npm run bench -- --only withdraw`) or alone:
//   node_modules/.bin/tsx bench/withdraw.ts [rows]
import { spawn } from "node:child_process";
import { mkdtempSync, openAsBlob, rmSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { benchLog, freePort, peakRssMb, signInAsLead, waitForHealth } from "./ingest.ts";
import { serverCommand } from "../scripts/server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const serverDir = join(root, "apps/server");
const PASSWORD = "bench-password-1";
const SITE = { latitude: -27.42, longitude: -70.15, elevationM: 2650 };
const MONITOR = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" as const };
/** Pause between two health requests of the probe. */
const PROBE_PAUSE_MS = 5;

interface ProbeFigures {
  requests: number;
  maxMs: number;
}

/** Asks /api/health one request after another (PROBE_PAUSE_MS apart) until stopped; the longest answer is the server's longest stall. */
function startProbe(base: string): { stop: () => Promise<ProbeFigures> } {
  let running = true;
  let maxMs = 0;
  let requests = 0;
  const loop = (async () => {
    while (running) {
      const startedMs = performance.now();
      const response = await fetch(`${base}/api/health`);
      await response.arrayBuffer();
      maxMs = Math.max(maxMs, performance.now() - startedMs);
      requests += 1;
      await new Promise((resolve) => setTimeout(resolve, PROBE_PAUSE_MS));
    }
  })();
  return {
    stop: async () => {
      running = false;
      await loop;
      return { requests, maxMs };
    },
  };
}

export async function run({ rows }: { rows: number; runs?: number }): Promise<Record<string, number | string>> {
  const logPath = await benchLog(rows);
  const dataDir = mkdtempSync(join(tmpdir(), "calmcrest-bench-withdraw-"));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const server = spawn(process.execPath, serverCommand().args, {
    cwd: serverDir,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: "users", DEMO_PASSWORD: PASSWORD, NODE_ENV: "development" },
    stdio: ["ignore", "ignore", "inherit"],
  });
  try {
    await waitForHealth(base, server, 30_000);
    const { headers, postJson } = await signInAsLead(base, PASSWORD);
    const site = await postJson("/api/sites", { name: "Withdrawal Ridge", ...SITE });
    const campaign = await postJson(`/api/sites/${site.id}/campaigns`, { name: "Withdrawal campaign", monitor: MONITOR });
    const waitDone = async (uploadId: number) => {
      for (;;) {
        const status = (await (await fetch(`${base}/api/uploads/${uploadId}`, { headers })).json()) as { status: string; samples: { accepted: number }; error: string | null };
        if (status.status === "done") return status;
        if (status.status !== "queued" && status.status !== "ingesting") throw new Error(`ingest ended ${status.status}: ${status.error ?? ""}`);
        await new Promise((resolve) => setTimeout(resolve, 50));
      }
    };
    const form = new FormData();
    form.append("file", await openAsBlob(logPath), "bench.csv");
    const posted = await fetch(`${base}/api/campaigns/${campaign.id}/uploads`, { method: "POST", headers, body: form });
    if (posted.status !== 202) throw new Error(`upload: ${posted.status} ${await posted.text()}`);
    const { upload } = (await posted.json()) as { upload: { id: number } };
    const stored = await waitDone(upload.id);

    /** One undo action with the probe running: its request time and the longest health answer meanwhile. */
    const timed = async (path: string, body: unknown, expected: number) => {
      await new Promise((resolve) => setTimeout(resolve, 300));
      const probe = startProbe(base);
      await new Promise((resolve) => setTimeout(resolve, 50));
      const startedMs = performance.now();
      const response = await fetch(`${base}${path}`, { method: "POST", headers: { ...headers, "Content-Type": "application/json" }, body: JSON.stringify(body) });
      const text = await response.text();
      const requestMs = performance.now() - startedMs;
      await new Promise((resolve) => setTimeout(resolve, 50));
      const figures = await probe.stop();
      if (response.status !== expected) throw new Error(`${path}: ${response.status} ${text}`);
      return { requestMs, healthMaxMs: figures.maxMs, healthRequests: figures.requests, body: text };
    };
    const withdrawn = await timed(`/api/uploads/${upload.id}/withdraw`, { reason: "bench: withdraw" }, 200);
    const restored = await timed(`/api/uploads/${upload.id}/restore`, { reason: "bench: restore" }, 200);
    const reread = await timed(`/api/uploads/${upload.id}/reread`, { reason: "bench: re-read" }, 202);
    const rereadId = (JSON.parse(reread.body) as { upload: { id: number } }).upload.id;
    await waitDone(rereadId);
    const round = (value: number) => Math.round(value * 10) / 10;
    return {
      // Other work on the machine lengthens every figure: the 1-minute load average when the actions ended.
      loadAverage1m: round(loadavg()[0] ?? Number.NaN),
      withdrawSamples: stored.samples.accepted,
      withdrawRequestMs: round(withdrawn.requestMs),
      withdrawHealthMaxMs: round(withdrawn.healthMaxMs),
      withdrawHealthRequests: withdrawn.healthRequests,
      restoreRequestMs: round(restored.requestMs),
      restoreHealthMaxMs: round(restored.healthMaxMs),
      rereadRequestMs: round(reread.requestMs),
      rereadHealthMaxMs: round(reread.healthMaxMs),
      serverPeakRssMb: Math.round(peakRssMb(server.pid ?? 0)),
    };
  } finally {
    server.kill("SIGTERM");
    await new Promise((resolve) => server.once("exit", resolve));
    rmSync(dataDir, { recursive: true, force: true });
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const rows = Number(process.argv[2] ?? 1_000_000);
  console.log(await run({ rows }));
}
