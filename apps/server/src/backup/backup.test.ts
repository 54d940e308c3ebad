import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { promisify } from "node:util";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import { createSiteAndCampaign, postUpload, waitForUpload } from "../routes/test-helpers";
import { SAME_ORIGIN, createTestServer, ingestHoldsWriteLock, signedInAgent } from "../test-support";
import { rawFilePath } from "../uploads/raw-files.server";
import { backupDataDir, backupFolderName, DATABASE_FILE, restoreBackup } from "./backup.server";

const scratch = mkdtempSync(join(tmpdir(), "calmcrest-backup-test-"));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

/** A native log of `rows` one-minute samples from `startIso`, every row valid. */
function log(rows: number, startIso: string): Buffer {
  const startMs = Date.parse(startIso);
  const lines = ["time_utc,seeing_arcsec,zenith_deg"];
  for (let index = 0; index < rows; index += 1) lines.push(`${new Date(startMs + index * 60_000).toISOString()},${(0.6 + (index % 50) / 100).toFixed(2)},12`);
  return Buffer.from(`${lines.join("\n")}\n`);
}

const sha256 = (bytes: Buffer) => createHash("sha256").update(bytes).digest("hex");

describe("npm run backup during an ingest, then npm run restore", () => {
  it("restores every committed sample and every raw file; the upload that was mid-ingest is there to retry", async () => {
    const { app, context, dataDir } = await createTestServer();
    const lead = await signedInAgent(app, "lead");
    const { campaign } = await createSiteAndCampaign(lead);
    const first = log(300, "2025-01-01T00:00:00Z");
    const done = await waitForUpload(lead, (await postUpload(lead, campaign.id, first, "first.csv")).body.upload.id);
    expect(done.samples.accepted).toBe(300);

    // The second upload's ingest holds its commit's write transaction open (a slow disk) while the backup runs.
    context.ingest.testHooks.holdCommitMs = 1500;
    const second = log(400, "2025-02-01T00:00:00Z");
    const secondId = (await postUpload(lead, campaign.id, second, "second.csv")).body.upload.id as number;
    for (;;) {
      const status = (await lead.get(`/api/uploads/${secondId}`)).body.status as string;
      if (status === "ingesting") break;
      await new Promise((resolve) => setTimeout(resolve, 20));
    }
    await ingestHoldsWriteLock(context);
    const startedMs = performance.now();
    const { folder, manifest } = await backupDataDir(dataDir, join(scratch, "backups"));
    // The backup did not wait for the ingest to commit.
    expect(performance.now() - startedMs).toBeLessThan(1000);
    expect((await lead.get(`/api/uploads/${secondId}`)).body.status).toBe("ingesting");
    context.ingest.testHooks.holdCommitMs = undefined;
    expect((await waitForUpload(lead, secondId)).samples.accepted).toBe(400);

    expect(folder).toMatch(/calmcrest-backup-\d{4}-\d{2}-\d{2}T\d{2}-\d{2}-\d{2}Z$/);
    expect(manifest).toMatchObject({ uploads: 2, samples: 300, rawFiles: { count: 2, bytes: first.length + second.length } });
    expect(readdirSync(join(scratch, "backups")).some((name) => name.endsWith(".partial"))).toBe(false);

    const restored = join(scratch, "restored");
    await restoreBackup(folder, restored);
    const db = new Database(join(restored, DATABASE_FILE), { readonly: true });
    expect(db.prepare("SELECT count(*) AS n FROM sample WHERE upload_id = ?").get(done.id)).toEqual({ n: 300 });
    // Nothing of the uncommitted ingest is in the copy.
    expect(db.prepare("SELECT count(*) AS n FROM sample WHERE upload_id = ?").get(secondId)).toEqual({ n: 0 });
    db.close();
    expect(sha256(readFileSync(rawFilePath(restored, sha256(first))))).toBe(sha256(first));
    expect(sha256(readFileSync(rawFilePath(restored, sha256(second))))).toBe(sha256(second));

    // A server on the restored directory marks the mid-ingest upload interrupted; a retry gives its exact count.
    const after = await createTestServer({ dataDir: restored });
    const leadAfter = await signedInAgent(after.app, "lead");
    const interrupted = (await leadAfter.get(`/api/uploads/${secondId}`)).body as { status: string };
    expect(interrupted.status).toBe("interrupted");
    expect((await leadAfter.post(`/api/uploads/${secondId}/retry`).set(SAME_ORIGIN).send({})).status).toBe(202);
    expect((await waitForUpload(leadAfter, secondId)).samples.accepted).toBe(400);
    const total = await after.context.db.knex("sample").where({ campaign_id: campaign.id }).count<{ n: number }[]>({ n: "*" }).first();
    expect(Number(total?.n)).toBe(700);
  }, 60_000);

  it("refuses to restore into a data directory that has anything in it, and changes nothing there", async () => {
    const { app, dataDir } = await createTestServer({ seed: "users" });
    await signedInAgent(app, "lead");
    const { folder } = await backupDataDir(dataDir, join(scratch, "refuse"), new Date("2025-05-01T02:00:00Z"));
    const occupied = join(scratch, "occupied");
    mkdirSync(occupied, { recursive: true });
    writeFileSync(join(occupied, "notes.txt"), "keep me");
    await expect(restoreBackup(folder, occupied)).rejects.toThrow(/is not empty, and a restore never overwrites data/);
    expect(readdirSync(occupied)).toEqual(["notes.txt"]);
  });

  it("refuses a folder that is not a backup, and a damaged one, leaving the target empty", async () => {
    await expect(restoreBackup(scratch, join(scratch, "never"))).rejects.toThrow(/not a Calmcrest backup/);
    const { dataDir } = await createTestServer({ seed: "users" });
    const { folder } = await backupDataDir(dataDir, join(scratch, "damaged"), new Date("2025-05-01T03:00:00Z"));
    writeFileSync(join(folder, DATABASE_FILE), "not a database");
    const target = join(scratch, "damaged-target");
    await expect(restoreBackup(folder, target)).rejects.toThrow(/damaged/);
    expect(existsSync(target) ? readdirSync(target) : []).toEqual([]);
  });

  it("names backup folders by UTC time, so they sort by age", () => {
    expect(backupFolderName(new Date("2026-12-03T02:00:09.123Z"))).toBe("calmcrest-backup-2026-12-03T02-00-09Z");
  });
});

describe("the backup and restore commands", () => {
  const repoRoot = join(dirname(fileURLToPath(import.meta.url)), "../../../..");
  const run = (args: string[], env: Record<string, string>) =>
    promisify(execFile)(join(repoRoot, "node_modules/.bin/tsx"), [join(repoRoot, "apps/server/src/backup/cli.ts"), ...args], { cwd: repoRoot, env: { ...process.env, ...env } });

  it("back up CALMCREST_DATA_DIR into CALMCREST_BACKUP_DIR and restore it, and explain a refused restore", async () => {
    const { dataDir } = await createTestServer({ seed: "users" });
    const backups = join(scratch, "cli-backups");
    const backedUp = await run(["backup"], { CALMCREST_DATA_DIR: dataDir, CALMCREST_BACKUP_DIR: backups });
    expect(backedUp.stdout).toMatch(/backed up .* to .*calmcrest-backup-.*: database .* MB \(0 uploads, 0 samples\), 0 raw files/);
    const [folder = ""] = readdirSync(backups);
    const restoredDir = join(scratch, "cli-restored");
    const restored = await run(["restore", join(backups, folder)], { CALMCREST_DATA_DIR: restoredDir });
    expect(restored.stdout).toMatch(/restored the backup of .* into/);
    expect(existsSync(join(restoredDir, DATABASE_FILE))).toBe(true);
    const refused = await run(["restore", join(backups, folder)], { CALMCREST_DATA_DIR: restoredDir }).catch((error: unknown) => error as { code: number; stderr: string });
    expect(refused).toMatchObject({ code: 1, stderr: expect.stringMatching(/is not empty, and a restore never overwrites data/) });
  }, 60_000);
});
