// Times what issue 8 measured for one very long line: a log whose second line is a single comment line of
// 60 MB (and 120 MB), through the upload API of a real server process, from POST to status `done`, with the
// server's peak memory. The line must be skipped as it streams past (rejected as line_too_long, never held
// whole), in time linear in its length, and sign-ins must answer meanwhile. Run alone:
//   node_modules/.bin/tsx bench/long-lines.ts [sizes in MB, default 60,120]
import { spawn } from "node:child_process";
import { createWriteStream, mkdtempSync, openAsBlob, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { freePort, peakRssMb, waitForHealth } from "./ingest.ts";
import { serverCommand } from "../scripts/server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const PASSWORD = "long-lines-password-1";

/** A small valid log with one comment line of `megabytes` MB after the header. */
async function writeLongLineLog(path: string, megabytes: number): Promise<void> {
  const out = createWriteStream(path);
  const write = (text: string) => new Promise<void>((resolve) => (out.write(text) ? resolve() : out.once("drain", resolve)));
  await write("time_utc,seeing_arcsec,zenith_deg\n# ");
  const chunk = "x".repeat(1024 * 1024);
  for (let index = 0; index < megabytes; index += 1) await write(chunk);
  await write("\n2025-04-08T03:00:00Z,0.8,20\n2025-04-08T03:01:00Z,0.9,21\n");
  await new Promise<void>((resolve) => out.end(resolve));
}

const sizes = (process.argv[2] ?? "60,120").split(",").map(Number);
const work = mkdtempSync(join(tmpdir(), "calmcrest-long-lines-"));
const port = await freePort();
const base = `http://127.0.0.1:${port}`;
const server = spawn(process.execPath, serverCommand().args, {
  cwd: join(root, "apps/server"),
  env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: join(work, "data"), CALMCREST_SEED: "users", DEMO_PASSWORD: PASSWORD, NODE_ENV: "development" },
  stdio: ["ignore", "ignore", "inherit"],
});
try {
  await waitForHealth(base, server, 60_000);
  const signIn = () =>
    fetch(`${base}/api/auth/sign-in`, { method: "POST", headers: { Origin: base, "Content-Type": "application/json" }, body: JSON.stringify({ email: "lead@calmcrest.test", password: PASSWORD }) });
  const first = await signIn();
  const headers = { Origin: base, Cookie: (first.headers.get("set-cookie") ?? "").split(";")[0] ?? "" };
  const post = async (path: string, body: unknown) =>
    (await (await fetch(`${base}${path}`, { method: "POST", headers: { ...headers, "Content-Type": "application/json" }, body: JSON.stringify(body) })).json()) as { id: number };
  const site = await post("/api/sites", { name: "Long Line Ridge", latitude: -27.42, longitude: -70.15, elevationM: 2650 });
  for (const megabytes of sizes) {
    const campaign = await post(`/api/sites/${site.id}/campaigns`, { name: `${megabytes} MB line`, monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 } });
    const path = join(work, `line-${megabytes}.csv`);
    await writeLongLineLog(path, megabytes);
    const form = new FormData();
    form.append("file", await openAsBlob(path), `line-${megabytes}.csv`);
    const startedMs = performance.now();
    const posted = await fetch(`${base}/api/campaigns/${campaign.id}/uploads`, { method: "POST", headers, body: form });
    const acceptedMs = performance.now() - startedMs;
    const { upload } = (await posted.json()) as { upload: { id: number } };
    let slowestSignInMs = 0;
    let status: { status: string; samples: { read: number; accepted: number; rejectedByReason: Record<string, number> } };
    for (;;) {
      const signInStartedMs = performance.now();
      const signedIn = await signIn();
      slowestSignInMs = Math.max(slowestSignInMs, performance.now() - signInStartedMs);
      if (!signedIn.ok) throw new Error(`sign-in during the ingest: ${signedIn.status}`);
      status = (await (await fetch(`${base}/api/uploads/${upload.id}`, { headers })).json()) as typeof status;
      if (status.status !== "queued" && status.status !== "ingesting") break;
      await new Promise((resolve) => setTimeout(resolve, 100));
    }
    const doneS = (performance.now() - startedMs) / 1000;
    console.log(
      JSON.stringify({
        lineMb: megabytes,
        answer: posted.status,
        acceptedAfterMs: Math.round(acceptedMs),
        doneAfterS: Math.round(doneS * 100) / 100,
        status: status.status,
        samples: status.samples,
        slowestSignInMs: Math.round(slowestSignInMs),
        serverPeakRssMb: Math.round(peakRssMb(server.pid ?? 0)),
      }),
    );
    rmSync(path, { force: true });
  }
} finally {
  server.kill("SIGTERM");
  await new Promise((resolve) => server.once("exit", resolve));
  rmSync(work, { recursive: true, force: true });
}
