import { createHash } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it, vi } from "vitest";
import { createSiteAndCampaign, postUpload, waitForUpload } from "../routes/test-helpers";
import { createTestServer, signedInAgent } from "../test-support";
import { rawFilePath, tmpDir } from "./raw-files.server";

const LOG = "time_utc,seeing_arcsec,zenith_deg\n2025-01-01T03:00:00Z,0.81,10\n2025-01-01T03:01:00Z,0.83,10\n";

describe("start-up cleaning of what a killed server left behind", () => {
  it("removes unfinished .part transfers and raw files no upload refers to, keeps every recorded raw file, and logs it", async () => {
    const first = await createTestServer();
    const lead = await signedInAgent(first.app, "lead");
    const { campaign } = await createSiteAndCampaign(lead);
    const done = await waitForUpload(lead, (await postUpload(lead, campaign.id, Buffer.from(LOG), "kept.csv")).body.upload.id);
    expect(done.status).toBe("done");
    const keptSha = createHash("sha256").update(LOG).digest("hex");
    await first.context.close();

    // A transfer killed mid-way, and a file stored by an upload killed before its row was written.
    mkdirSync(tmpDir(first.dataDir), { recursive: true });
    writeFileSync(join(tmpDir(first.dataDir), "1764000000000-killed.part"), "time_utc,seeing_arcsec\n2031-01-01");
    const orphanText = "time_utc,seeing_arcsec\n2025-02-01T03:00:00Z,0.9\n";
    const orphanSha = createHash("sha256").update(orphanText).digest("hex");
    mkdirSync(join(first.dataDir, "uploads", orphanSha.slice(0, 2)), { recursive: true });
    writeFileSync(rawFilePath(first.dataDir, orphanSha), orphanText);

    const log = vi.spyOn(console, "log");
    const restarted = await createTestServer({ dataDir: first.dataDir });
    expect(readdirSync(tmpDir(first.dataDir))).toEqual([]);
    expect(existsSync(rawFilePath(first.dataDir, orphanSha))).toBe(false);
    expect(existsSync(rawFilePath(first.dataDir, keptSha))).toBe(true);
    const logged = log.mock.calls.map(String).join("\n");
    expect(logged).toContain("1 unfinished transfer file(s) in tmp/ (1764000000000-killed.part)");
    expect(logged).toContain(`1 stored raw file(s) no upload refers to (uploads/${orphanSha.slice(0, 2)}/${orphanSha})`);

    // The recorded upload can still be retried from its raw file: nothing it needs was cleaned.
    const again = await signedInAgent(restarted.app, "lead");
    expect((await again.get(`/api/uploads/${done.id}`)).body.status).toBe("done");
  });

  it("logs nothing when there is nothing to clean", async () => {
    const log = vi.spyOn(console, "log");
    await createTestServer({ seed: "none" });
    expect(log.mock.calls.map(String).join("\n")).not.toMatch(/left behind/);
  });
});
