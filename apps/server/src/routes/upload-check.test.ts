import { createHash } from "node:crypto";
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import type { WholeFileCheck } from "@calmcrest/contracts";
import { countRows, createTestServer, SAME_ORIGIN, signedInAgent } from "../test-support";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, waitForUpload } from "./test-helpers";

const { app, context } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const fwhmLog = join(DATA_SAMPLES, "wizard-fwhm-airmass.csv");

function check(campaignId: number, file: Buffer | string, mapping?: Record<string, string | null>) {
  const request = lead.post(`/api/campaigns/${campaignId}/uploads/check`).set(SAME_ORIGIN);
  if (mapping) void request.field("mapping", JSON.stringify(mapping));
  return typeof file === "string" ? request.attach("file", file) : request.attach("file", file, "log.csv");
}

describe("the whole-file check before an upload", () => {
  it("reads every row, finds the bad rows far down the file with their raw text, and stores nothing", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const response = await check(campaign.id, fwhmLog);
    expect(response.status).toBe(200);
    const result = response.body as WholeFileCheck;
    // data-samples/README.md: airmass 0.800 on line 52 (non_physical), empty FWHM on line 103 (missing_value),
    // airmass 2.500 on line 154 (read, but beyond the standard 60° zenith limit).
    expect(result).toMatchObject({ rowsRead: 400, usable: 398, rejected: 2, rejectedByReason: { non_physical: 1, missing_value: 1 } });
    expect(result.problemLines.map((line) => [line.line, line.reason])).toEqual([
      [52, "non_physical"],
      [103, "missing_value"],
    ]);
    const lines = readFileSync(fwhmLog, "utf8").split("\n");
    expect(result.problemLines[0]?.rawLine).toBe(lines[51]);
    expect(result.setAsideByStandardFilters.zenith_limit).toBe(1);
    expect(result.sizeBytes).toBe(readFileSync(fwhmLog).length);
    expect(result.sameFile).toBeNull();
    expect(await countRows(context, "upload", { campaign_id: campaign.id })).toBe(0);
    const tmp = join(context.env.dataDir, "tmp");
    expect(existsSync(tmp) ? readdirSync(tmp) : []).toEqual([]);
  });

  it("keeps the first three problem lines of each reason and counts the rest", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const rows = ["time_utc,seeing_arcsec,zenith_deg"];
    for (let index = 0; index < 50; index += 1) rows.push(`2025-03-01T0${Math.floor(index / 10)}:${String((index % 10) * 5).padStart(2, "0")}:00Z,${index % 5 === 0 ? "x" : "0.8"},20`);
    const result = (await check(campaign.id, Buffer.from(`${rows.join("\n")}\n`))).body as WholeFileCheck;
    expect(result.rejectedByReason).toEqual({ missing_value: 10 });
    expect(result.problemLines.map((line) => line.line)).toEqual([2, 7, 12]);
  });

  it("counts rows whose times the campaign already holds as duplicates, like the upload would", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    await waitForUpload(lead, (await postUpload(lead, campaign.id, fwhmLog)).body.upload.id);
    const result = (await check(campaign.id, fwhmLog)).body as WholeFileCheck;
    expect(result).toMatchObject({ rowsRead: 400, usable: 0, rejectedByReason: { non_physical: 1, missing_value: 1, duplicate_time: 398 } });
    // The same bytes: the answer names the upload that holds them (the upload would be a 409, not a new upload).
    expect(result.sameFile).toMatchObject({ fileName: "wizard-fwhm-airmass.csv" });
    expect(result.sha256).toBe(createHash("sha256").update(readFileSync(fwhmLog)).digest("hex"));
    expect(result.problemLines.filter((line) => line.reason === "duplicate_time")[0]?.message).toMatch(/this campaign already holds/);
  });

  it("uses the mapping sent, and answers 400 with what to fix for a file that cannot be read", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    // Julian dates in the time column: every row is unreadable, the check says so before anything is stored.
    const jd = Buffer.from("jd,seeing_arcsec,zenith_deg\n2460000.5,0.8,20\n2460000.6,0.9,20\n");
    const julian = (await check(campaign.id, jd, { time_utc: "jd" })).body as WholeFileCheck;
    expect(julian).toMatchObject({ rowsRead: 2, usable: 0, rejectedByReason: { unreadable_time: 2 } });
    const binary = await check(campaign.id, join(DATA_SAMPLES, "malformed-binary.bin"));
    expect(binary.status).toBe(400);
    expect(binary.body.error.message).toMatch(/not a text log/);
  });
});

describe("files whose times are not ISO 8601", () => {
  const jdLog = join(DATA_SAMPLES, "time-jd.csv");
  it("reads Julian dates when the upload says so, in the check, the preview and the ingest alike (data-samples/README.md: 120 read, 119 accepted)", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const readOptions = JSON.stringify({ timeFormat: "jd" });
    const checked = (await lead
      .post(`/api/campaigns/${campaign.id}/uploads/check`)
      .set(SAME_ORIGIN)
      .field("mapping", JSON.stringify({ time_utc: "jd" }))
      .field("readOptions", readOptions)
      .attach("file", jdLog)).body as WholeFileCheck;
    expect(checked).toMatchObject({ rowsRead: 120, usable: 119, rejectedByReason: { unreadable_time: 1 } });
    expect(checked.problemLines[0]?.line).toBe(42);
    const preview = await lead
      .post(`/api/campaigns/${campaign.id}/uploads/preview`)
      .set(SAME_ORIGIN)
      .field("mapping", JSON.stringify({ time_utc: "jd" }))
      .field("readOptions", readOptions)
      .attach("file", jdLog);
    expect(preview.body.rows[0].sample.timeMs).toBe(Date.UTC(2025, 5, 10, 23));
    const posted = await lead
      .post(`/api/campaigns/${campaign.id}/uploads`)
      .set(SAME_ORIGIN)
      .field("mapping", JSON.stringify({ time_utc: "jd" }))
      .field("readOptions", readOptions)
      .attach("file", jdLog);
    expect(posted.status).toBe(202);
    const done = await waitForUpload(lead, posted.body.upload.id);
    expect(done.samples).toMatchObject({ read: 120, accepted: 119, rejectedByReason: { unreadable_time: 1 } });
    expect(done.readOptions).toEqual({ timeFormat: "jd", utcOffsetMinutes: 0 });
  });

  it("re-reads a file sent without its time format, and refuses read options it cannot use", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const first = await waitForUpload(lead, (await postUpload(lead, campaign.id, jdLog, "log.csv", { time_utc: "jd" })).body.upload.id);
    expect(first.samples).toMatchObject({ read: 120, accepted: 1 });
    const reread = await lead.post(`/api/uploads/${first.id}/reread`).set(SAME_ORIGIN).send({ readOptions: { timeFormat: "jd" }, reason: "The times are Julian dates" });
    expect(reread.status).toBe(202);
    const done = await waitForUpload(lead, reread.body.upload.id);
    expect(done.samples).toMatchObject({ read: 120, accepted: 119 });
    const bad = await lead
      .post(`/api/campaigns/${campaign.id}/uploads/check`)
      .set(SAME_ORIGIN)
      .field("readOptions", JSON.stringify({ timeFormat: "unix" }))
      .attach("file", jdLog);
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/timeFormat must be iso, jd, mjd, dmy or mdy/);
  });
});
