import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, openAsBlob, readdirSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import { writeSyntheticLog } from "@calmcrest/seeing-stats/node";

// A server killed with SIGKILL in the middle of an ingest, as a real child process: nothing of the upload may be
// stored, the next start marks it interrupted and removes the half-read staging file, and a retry stores exactly
// the samples a clean ingest stores.

const serverDir = join(dirname(fileURLToPath(import.meta.url)), "../..");
const work = mkdtempSync(join(tmpdir(), "calmcrest-sigkill-"));
const dataDir = join(work, "data");
const PASSWORD = "sigkill-password-1";
const ROWS = 150_000;
const children: ChildProcess[] = [];
afterAll(() => {
  for (const child of children) if (child.exitCode === null) child.kill("SIGKILL");
  rmSync(work, { recursive: true, force: true });
});

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once("error", reject);
    probe.listen(0, "127.0.0.1", () => {
      const address = probe.address();
      probe.close(() => resolve(typeof address === "object" && address ? address.port : 0));
    });
  });
}

async function startServer(): Promise<{ child: ChildProcess; base: string }> {
  const port = await freePort();
  const child = spawn(process.execPath, ["--import", "tsx", "src/main.ts"], {
    cwd: serverDir,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: "users", DEMO_PASSWORD: PASSWORD, NODE_ENV: "development" },
    stdio: ["ignore", "ignore", "ignore"],
  });
  children.push(child);
  const base = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`the server exited with code ${child.exitCode}`);
    if (Date.now() > deadline) throw new Error("the server did not start within 60 s");
    try {
      if ((await fetch(`${base}/api/health`)).ok) return { child, base };
    } catch {
      // not listening yet
    }
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}

async function signIn(base: string): Promise<Record<string, string>> {
  const response = await fetch(`${base}/api/auth/sign-in`, {
    method: "POST",
    headers: { Origin: base, "Content-Type": "application/json" },
    body: JSON.stringify({ email: "lead@calmcrest.test", password: PASSWORD }),
  });
  expect(response.status).toBe(200);
  return { Origin: base, Cookie: (response.headers.get("set-cookie") ?? "").split(";")[0] ?? "" };
}

interface Status {
  status: string;
  progress: number;
  samples: { read: number; accepted: number };
}

async function statusOf(base: string, headers: Record<string, string>, uploadId: number): Promise<Status> {
  return (await (await fetch(`${base}/api/uploads/${uploadId}`, { headers })).json()) as Status;
}

function storedSamples(): number {
  const db = new Database(join(dataDir, "calmcrest.sqlite"), { readonly: true });
  try {
    return (db.prepare("SELECT COUNT(*) AS n FROM sample").get() as { n: number }).n;
  } finally {
    db.close();
  }
}

describe("SIGKILL in the middle of an ingest", () => {
  it("stores nothing of the upload; the next start marks it interrupted and cleans its staging file; a retry stores the exact count", async () => {
    const logPath = join(work, "log.csv");
    // One damaged row in every 997, as in the bench log.
    const written = await writeSyntheticLog(logPath, {
      seed: 8,
      site: { latitudeDeg: -27.42, longitudeDeg: -70.15, elevationM: 2650 },
      startDate: "2019-01-01",
      nights: Math.ceil(ROWS / 300) + 30,
      medianSeeingArcsec: 0.75,
      monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" },
      badRowEvery: 997,
      maxRows: ROWS,
    });
    expect(written.rows).toBe(ROWS);

    const first = await startServer();
    let headers = await signIn(first.base);
    const post = async (base: string, path: string, body: unknown) =>
      (await (await fetch(`${base}${path}`, { method: "POST", headers: { ...headers, "Content-Type": "application/json" }, body: JSON.stringify(body) })).json()) as { id: number };
    const site = await post(first.base, "/api/sites", { name: "Kill Ridge", latitude: -27.42, longitude: -70.15, elevationM: 2650 });
    const campaign = await post(first.base, `/api/sites/${site.id}/campaigns`, { name: "Killed", monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 } });
    const form = new FormData();
    form.append("file", await openAsBlob(logPath), "log.csv");
    const posted = await fetch(`${first.base}/api/campaigns/${campaign.id}/uploads`, { method: "POST", headers, body: form });
    expect(posted.status).toBe(202);
    const uploadId = ((await posted.json()) as { upload: { id: number } }).upload.id;
    // Kill it once a good part of the file has been read.
    for (;;) {
      const status = await statusOf(first.base, headers, uploadId);
      expect(status.status === "queued" || status.status === "ingesting").toBe(true);
      if (status.status === "ingesting" && status.progress >= 0.2) break;
      await new Promise((resolve) => setTimeout(resolve, 5));
    }
    first.child.kill("SIGKILL");
    await new Promise((resolve) => first.child.once("exit", resolve));
    expect(storedSamples()).toBe(0);

    const second = await startServer();
    headers = await signIn(second.base);
    const interrupted = await statusOf(second.base, headers, uploadId);
    expect(interrupted.status).toBe("interrupted");
    expect(storedSamples()).toBe(0);
    const tmp = join(dataDir, "tmp");
    expect(existsSync(tmp) ? readdirSync(tmp) : []).toEqual([]);

    const retried = await fetch(`${second.base}/api/uploads/${uploadId}/retry`, { method: "POST", headers });
    expect(retried.status).toBe(202);
    let done: Status;
    for (;;) {
      done = await statusOf(second.base, headers, uploadId);
      if (done.status !== "queued" && done.status !== "ingesting") break;
      await new Promise((resolve) => setTimeout(resolve, 50));
    }
    expect(done.status).toBe("done");
    expect(done.samples.read).toBe(ROWS);
    expect(done.samples.accepted).toBe(ROWS - Math.floor(ROWS / 997));
    expect(storedSamples()).toBe(ROWS - Math.floor(ROWS / 997));
    second.child.kill("SIGTERM");
    await new Promise((resolve) => second.child.once("exit", resolve));
  }, 180_000);
});
