import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeLog } from "@calmcrest/seeing-stats/node";
import type { SummaryResponse, UploadDuplicateBody, UploadPreview } from "@calmcrest/contracts";
import { countRows, createTestServer, ingestHoldsWriteLock, SAME_ORIGIN, signedInAgent, simulateDeadIngest, tableRows, takeWriteLockWithoutWaiting, userIdOf } from "../test-support";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, SAMPLES_SITE, waitForUpload } from "./test-helpers";

const { app, context } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const admin = await signedInAgent(app, "admin");
const engineer = await signedInAgent(app, "engineer");
const nativeLog = join(DATA_SAMPLES, "native-arcsec2.csv");
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 };

async function sampleCount(uploadId: number): Promise<number> {
  return countRows(context, "sample", { upload_id: uploadId });
}

describe("uploading a log", () => {
  it("stores the raw file by its sha256 and answers 409 with the existing upload when the same file comes again", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    const first = await postUpload(lead, campaign.id, nativeLog);
    expect(first.status).toBe(202);
    const done = await waitForUpload(lead, first.body.upload.id);
    expect(done.status).toBe("done");
    const stored = readFileSync(join(context.env.dataDir, "uploads", done.sha256.slice(0, 2), done.sha256));
    expect(stored.equals(readFileSync(nativeLog))).toBe(true);

    const again = await postUpload(lead, campaign.id, nativeLog);
    expect(again.status).toBe(409);
    const body = again.body as UploadDuplicateBody;
    expect(body.error.code).toBe("duplicate_upload");
    expect(body.upload.id).toBe(done.id);
    expect(await sampleCount(done.id)).toBe(done.samples.accepted);
    const uploads = await tableRows(context, "upload", { campaign_id: campaign.id });
    expect(uploads).toHaveLength(1);
  });

  it("rejects samples whose time an earlier upload of the campaign already has, as duplicate_time", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    const lines = readFileSync(nativeLog, "utf8").trimEnd().split("\n");
    const header = lines.findIndex((line) => line.startsWith("time_utc"));
    const firstHalf = [...lines.slice(0, header + 1), ...lines.slice(header + 1, header + 31)];
    const overlapping = [...lines.slice(0, header + 1), ...lines.slice(header + 21, header + 31), "2024-01-01T03:00:00Z,0.0701838,0.0504529,20.0,20000"];
    const a = await waitForUpload(lead, (await postUpload(lead, campaign.id, Buffer.from(`${firstHalf.join("\n")}\n`), "a.csv")).body.upload.id);
    const b = await waitForUpload(lead, (await postUpload(lead, campaign.id, Buffer.from(`${overlapping.join("\n")}\n`), "b.csv")).body.upload.id);
    expect(a.samples).toMatchObject({ read: 30, accepted: 30, rejected: 0 });
    expect(b.samples).toMatchObject({ read: 11, accepted: 1, rejected: 10, rejectedByReason: { duplicate_time: 10 } });
    expect(b.rejectedRows.map((row) => row.reason)).toEqual(Array(10).fill("duplicate_time"));
    // rejected.csv gives each duplicate row's text back as it was in the file.
    const csv = (await lead.get(`/api/uploads/${b.id}/rejected.csv`)).text;
    for (const duplicateRow of lines.slice(header + 21, header + 31)) expect(csv).toContain(duplicateRow.trim());
    const stored = await countRows(context, "sample", { campaign_id: campaign.id });
    expect(Number(stored)).toBe(31);
  });

  it("answers 400 with the line and a fix for files that cannot be read, and stores nothing", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    const binary = await postUpload(lead, campaign.id, join(DATA_SAMPLES, "malformed-binary.bin"));
    expect(binary.status).toBe(400);
    expect(binary.body.error.message).toMatch(/not a text log: line \d+/);
    const noTime = await postUpload(lead, campaign.id, join(DATA_SAMPLES, "malformed-no-time.csv"));
    expect(noTime.status).toBe(400);
    expect(noTime.body.error.message).toMatch(/Line 1 \(the header line\)/);
    expect(noTime.body.error.message).toMatch(/time/);
    const empty = await postUpload(lead, campaign.id, join(DATA_SAMPLES, "malformed-empty.csv"));
    expect(empty.status).toBe(400);
    expect(empty.body.error.message).toMatch(/empty/);
    const badMapping = await postUpload(lead, campaign.id, nativeLog, "log.csv", { time_utc: "No Such Column" });
    expect(badMapping.status).toBe(400);
    expect(await tableRows(context, "upload", { campaign_id: campaign.id })).toHaveLength(0);
  });

  it("leaves no samples behind when an ingest fails half way, and ingests everything on retry", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    context.ingest.testHooks.failAfterSamples = 100;
    const posted = await postUpload(lead, campaign.id, nativeLog);
    const failed = await waitForUpload(lead, posted.body.upload.id);
    context.ingest.testHooks.failAfterSamples = undefined;
    expect(failed.status).toBe("failed");
    expect(failed.error).toMatch(/after 100 samples/);
    expect(failed.samples).toEqual({ read: 0, accepted: 0, rejected: 0, rejectedByReason: {} });
    expect(await sampleCount(failed.id)).toBe(0);
    expect(await tableRows(context, "upload_reject", { upload_id: failed.id })).toHaveLength(0);

    expect((await lead.post(`/api/uploads/${failed.id}/retry`).set(SAME_ORIGIN)).status).toBe(202);
    const done = await waitForUpload(lead, failed.id);
    expect(done.status).toBe("done");
    expect(done.samples.accepted).toBeGreaterThan(100);
    expect(await sampleCount(done.id)).toBe(done.samples.accepted);
    expect((await lead.post(`/api/uploads/${done.id}/retry`).set(SAME_ORIGIN)).status).toBe(409);
    const audit = await context.store.audit.list({ targetType: "upload", targetId: done.id });
    expect(audit.map((row: { action: string }) => row.action)).toEqual(["upload.create", "upload.retry"]);
  });

  it("lists every rejected row with its reason in rejected.csv, and the first ones in the status", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    const done = await waitForUpload(lead, (await postUpload(lead, campaign.id, nativeLog)).body.upload.id);
    const csv = await lead.get(`/api/uploads/${done.id}/rejected.csv`);
    expect(csv.status).toBe(200);
    expect(csv.headers["content-type"]).toMatch(/text\/csv/);
    const rows = csv.text.trimEnd().split("\n");
    // Every cell quoted, the header too (spreadsheet-safe CSV, issue 8).
    expect(rows[0]).toBe('"line","reason","message","raw_line"');
    expect(rows).toHaveLength(1 + done.samples.rejected);
    expect(done.rejectedRows).toHaveLength(done.samples.rejected);
    for (const rejected of done.rejectedRows) expect(csv.text).toContain(`"${rejected.line}","${rejected.reason}",`);
    // The raw text of an unreadable row comes back as it was in the file.
    expect(csv.text).toContain("yesterday evening");
  });

  it("gives the mapping's header names and the first 20 rows in a preview, storing nothing", async () => {
    const { campaign } = await createSiteAndCampaign(lead, { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 });
    const text = readFileSync(join(DATA_SAMPLES, "wizard-fwhm-airmass.csv"), "utf8").split("\n").slice(0, 40).join("\n");
    const response = await lead.post(`/api/campaigns/${campaign.id}/uploads/preview`).set(SAME_ORIGIN).attach("file", Buffer.from(text), "slice.csv");
    expect(response.status).toBe(200);
    const preview = response.body as UploadPreview;
    expect(preview.delimiter).toBe(";");
    expect(preview.headers).toEqual(["Timestamp (UTC)", "FWHM [arcsec]", "Airmass", "Wind [m/s]"]);
    expect(preview.rows).toHaveLength(20);
    const mapping = { time_utc: "Timestamp (UTC)", seeing_arcsec: "FWHM [arcsec]", airmass: "Airmass", wind_ms: "Wind [m/s]" };
    const mapped = await lead
      .post(`/api/campaigns/${campaign.id}/uploads/preview`)
      .set(SAME_ORIGIN)
      .field("mapping", JSON.stringify(mapping))
      .attach("file", Buffer.from(text), "slice.csv");
    expect(mapped.status).toBe(200);
    const mappedPreview = mapped.body as UploadPreview;
    expect(mappedPreview.mappingProblems).toEqual([]);
    expect(mappedPreview.mappingUsed).toEqual(mapping);
    expect(mappedPreview.rows[0]?.sample?.windMs).toBeCloseTo(Number(text.split("\n")[1]?.split(";")[3]), 6);
    expect(await tableRows(context, "upload", { campaign_id: campaign.id })).toHaveLength(0);
  });

  it("reads a sent mapping as overrides of the named fields only: {} overrides nothing, null leaves a column unread", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    const log = ["time_utc,seeing_arcsec,ZD,flux", "2025-03-01T02:00:00Z,0.8,20,100", "2025-03-01T02:10:00Z,0.9,,200"].join("\n");
    const preview = async (mapping: Record<string, string | null>) => {
      const response = await lead.post(`/api/campaigns/${campaign.id}/uploads/preview`).set(SAME_ORIGIN).field("mapping", JSON.stringify(mapping)).attach("file", Buffer.from(log), "zd.csv");
      expect(response.status).toBe(200);
      return response.body as UploadPreview;
    };
    const named = await preview({ zenith_deg: "ZD" });
    expect(named.mappingUsed).toEqual({ time_utc: "time_utc", seeing_arcsec: "seeing_arcsec", zenith_deg: "ZD", flux: "flux" });
    expect((await preview({})).mappingUsed).toEqual(named.mappingUsed);
    expect((await preview({ flux: null })).mappingUsed).toEqual({ time_utc: "time_utc", seeing_arcsec: "seeing_arcsec", zenith_deg: "ZD" });

    // The upload stores the mapping it read with, and the ingest reads exactly that (flux stays unread).
    const posted = await postUpload(lead, campaign.id, Buffer.from(log), "zd.csv", { flux: null });
    expect(posted.status).toBe(202);
    const done = await waitForUpload(lead, posted.body.upload.id);
    expect(done.mapping).toEqual({ time_utc: "time_utc", seeing_arcsec: "seeing_arcsec", zenith_deg: "ZD" });
    // The second row has no zenith angle and no airmass column to fall back to: missing_value.
    expect(done.samples).toMatchObject({ read: 2, accepted: 1, rejectedByReason: { missing_value: 1 } });
    const stored = await tableRows(context, "sample", { upload_id: done.id });
    expect(stored.map((row) => row.flux)).toEqual([null]);
  });

  it("lets a member engineer upload, answers 404 to a non-member and 403 to an administrator", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    // A refusal is answered before the body is read, and supertest then closes its server: a body of one small
    // write is sent whole first (a large one could meet the closed socket as EPIPE before the answer is read).
    const tiny = Buffer.from("time_utc,seeing_arcsec,zenith_deg\n2025-04-08T03:00:00Z,0.8,20\n");
    expect((await postUpload(engineer, campaign.id, tiny, "tiny.csv")).status).toBe(404);
    expect((await postUpload(admin, campaign.id, tiny, "tiny.csv")).status).toBe(403);
    const engineerId = await userIdOf(context, "engineer@calmcrest.test");
    await admin.post(`/api/campaigns/${campaign.id}/members`).set(SAME_ORIGIN).send({ userId: engineerId });
    const posted = await postUpload(engineer, campaign.id, nativeLog);
    expect(posted.status).toBe(202);
    const done = await waitForUpload(engineer, posted.body.upload.id);
    expect(done.uploadedBy.name).toBe("Lena Marchetti");
    // An outsider cannot see the upload either.
    await admin.delete(`/api/campaigns/${campaign.id}/members/${engineerId}`).set(SAME_ORIGIN);
    expect((await engineer.get(`/api/uploads/${done.id}`)).status).toBe(404);
    expect((await engineer.get(`/api/uploads/${done.id}/rejected.csv`)).status).toBe(404);
  });
});

describe("the ingest queue", () => {
  it("ingests one upload at a time, in the order they arrived", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    const files = ["native-arcsec2.csv", "r0-cm.csv", "wizard-fwhm-airmass.csv"];
    const ids: number[] = [];
    for (const file of files) ids.push((await postUpload(lead, campaign.id, join(DATA_SAMPLES, file))).body.upload.id as number);
    const statuses = [];
    for (const id of ids) statuses.push(await waitForUpload(lead, id));
    expect(statuses.map((status) => status.status)).toEqual(["done", "done", "done"]);
    for (let index = 1; index < statuses.length; index += 1) {
      const previous = statuses[index - 1];
      const current = statuses[index];
      // Each ingest started only after the one before it had finished.
      expect(Date.parse(current?.startedAt ?? "")).toBeGreaterThanOrEqual(Date.parse(previous?.finishedAt ?? ""));
    }
    expect(statuses.every((status) => status.progress === 1)).toBe(true);
  });
});

describe("writes while an ingest runs", () => {
  it("go on while it reads its file: a second upload answers 202, an exclusion 201, and the ingest holds no write lock", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    // The ingest sleeps 2 s while reading (a slow disk, a huge file).
    context.ingest.testHooks.pauseAfterSamples = { samples: 50, ms: 2000 };
    const first = (await postUpload(lead, campaign.id, nativeLog)).body.upload.id as number;
    context.ingest.testHooks.pauseAfterSamples = undefined;
    while (((await lead.get(`/api/uploads/${first}`)).body as { status: string }).status !== "ingesting") await new Promise((resolve) => setTimeout(resolve, 10));
    await new Promise((resolve) => setTimeout(resolve, 100));
    // A writer that does not wait gets the write lock: the reading ingest does not hold it.
    takeWriteLockWithoutWaiting(context);
    const startedMs = Date.now();
    const second = await postUpload(lead, campaign.id, join(DATA_SAMPLES, "r0-cm.csv"));
    expect(second.status).toBe(202);
    const exclusion = await lead.post(`/api/campaigns/${campaign.id}/exclusions`).set(SAME_ORIGIN).send({ from: "2020-01-01", to: "2020-01-02", reason: "during ingest" });
    expect(exclusion.status).toBe(201);
    // Both answered long before the first ingest's 2 s of reading were over.
    expect(Date.now() - startedMs).toBeLessThan(1000);
    expect(((await lead.get(`/api/uploads/${first}`)).body as { status: string }).status).toBe("ingesting");
    const done = await waitForUpload(lead, first);
    expect(done.status).toBe("done");
    expect(await sampleCount(first)).toBe(done.samples.accepted);
    expect((await waitForUpload(lead, second.body.upload.id)).status).toBe("done");
  });

  it("keep the server answering during its commit: a second upload and an exclusion wait for the commit instead of freezing the event loop", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    // The commit's write transaction stays open 1.5 s (a slow disk).
    context.ingest.testHooks.holdCommitMs = 1500;
    const first = (await postUpload(lead, campaign.id, nativeLog)).body.upload.id as number;
    context.ingest.testHooks.holdCommitMs = undefined;
    // Wait until the worker holds the write lock.
    await ingestHoldsWriteLock(context);
    const secondStartedMs = Date.now();
    const second = postUpload(lead, campaign.id, join(DATA_SAMPLES, "r0-cm.csv")).then((response) => ({ response, ms: Date.now() - secondStartedMs }));
    const exclusion = lead.post(`/api/campaigns/${campaign.id}/exclusions`).set(SAME_ORIGIN).send({ from: "2020-01-01", to: "2020-01-02", reason: "during ingest" }).then((response) => response);
    await new Promise((resolve) => setTimeout(resolve, 100));
    const pollStartedMs = Date.now();
    const poll = await lead.get(`/api/uploads/${first}`);
    const pollMs = Date.now() - pollStartedMs;
    expect(poll.body.status).toBe("ingesting");
    // The poll answered during the held transaction, long before it ends.
    expect(pollMs).toBeLessThan(500);
    const { response, ms } = await second;
    expect(response.status).toBe(202);
    expect((await exclusion).status).toBe(201);
    expect(ms).toBeGreaterThan(pollMs);
    expect((await waitForUpload(lead, first)).status).toBe("done");
    expect((await waitForUpload(lead, response.body.upload.id)).status).toBe("done");
  });
});

describe("changes that would make stored samples wrong", () => {
  it("refuses to move a site or change a campaign's monitor once uploads exist (409)", async () => {
    const { site, campaign } = await createSiteAndCampaign(lead, monitor);
    await waitForUpload(lead, (await postUpload(lead, campaign.id, join(DATA_SAMPLES, "r0-cm.csv"))).body.upload.id);
    const moved = await lead.patch(`/api/sites/${site.id}`).set(SAME_ORIGIN).send({ latitude: -20 });
    expect(moved.status).toBe(409);
    expect(moved.body.error.code).toBe("site_has_samples");
    const renamed = await lead.patch(`/api/sites/${site.id}`).set(SAME_ORIGIN).send({ name: "Renamed Ridge" });
    expect(renamed.status).toBe(200);
    const remonitored = await lead.patch(`/api/campaigns/${campaign.id}`).set(SAME_ORIGIN).send({ monitor: { ...monitor, apertureMm: 50 } });
    expect(remonitored.status).toBe(409);
    expect(remonitored.body.error.code).toBe("campaign_has_uploads");
  });
});

describe("summaries", () => {
  it("agree with the analyzer's JSON for the same file and site", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    await waitForUpload(lead, (await postUpload(lead, campaign.id, nativeLog)).body.upload.id);
    const response = await lead.get(`/api/campaigns/${campaign.id}/summary`);
    expect(response.status).toBe(200);
    const summary = response.body as SummaryResponse;
    const report = await analyzeLog(nativeLog, {
      monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: "z-tilt" },
      site: { latitudeDeg: SAMPLES_SITE.latitude, longitudeDeg: SAMPLES_SITE.longitude, elevationM: SAMPLES_SITE.elevationM },
      summary: { longitudeDeg: SAMPLES_SITE.longitude },
    });
    if (summary.empty) throw new Error("expected statistics");
    expect(summary.samples.read).toBe(report.samples.read);
    expect(summary.samples.accepted).toBe(report.samples.accepted);
    expect(summary.samples.rejectedByReason).toEqual(report.samples.rejectedByReason);
    expect(summary.seeing).toEqual(report.seeing);
    expect(summary.r0).toEqual(report.r0);
    expect(summary.lognormal).toEqual(report.lognormal);
    expect(summary.fractionBelow).toEqual(report.fractionBelow);
    expect(summary.nights).toBe(report.nights);
    expect(summary.monthly).toEqual(report.monthly);
    expect(summary.hourly).toEqual(report.hourly);
    expect(summary.histogram).toEqual(report.histogram);
    expect(summary.cdf).toEqual(report.cdf);
  });

  it("applies the query's filters and time range, and excluded windows leave every statistic", async () => {
    const { site, campaign } = await createSiteAndCampaign(lead, monitor);
    await waitForUpload(lead, (await postUpload(lead, campaign.id, nativeLog)).body.upload.id);
    const all = (await lead.get(`/api/campaigns/${campaign.id}/summary`)).body as SummaryResponse;
    const strict = (await lead.get(`/api/campaigns/${campaign.id}/summary?maxZenithDeg=30&minFlux=1000`)).body as SummaryResponse;
    expect(strict.filters).toMatchObject({ maxZenithDeg: 30, minFlux: 1000, sunMaxDeg: -18 });
    expect(strict.samples.accepted).toBeLessThan(all.samples.accepted);
    expect(strict.samples.rejectedByReason.zenith_limit ?? 0).toBeGreaterThan(all.samples.rejectedByReason.zenith_limit ?? 0);
    expect(strict.samples.rejectedByReason.low_flux).toBe(1);

    if (all.empty) throw new Error("expected statistics");
    const firstNight = all.nightly[0];
    if (!firstNight) throw new Error("expected nights");
    const ranged = (await lead.get(`/api/campaigns/${campaign.id}/summary?from=${all.nightly[1]?.night}`)).body as SummaryResponse;
    expect(ranged.includesIngestRejections).toBe(false);
    expect(ranged.samples.accepted).toBeLessThan(all.samples.accepted);

    // Exclude the whole first night: it ends at dawn of the next date (14:00 UTC is mid-morning at longitude -70).
    const endOfFirstNight = `${all.nightly[1]?.night}T14:00:00Z`;
    const exclusion = await lead
      .post(`/api/campaigns/${campaign.id}/exclusions`)
      .set(SAME_ORIGIN)
      .send({ from: "2000-01-01", to: endOfFirstNight, reason: "monitor misaligned" });
    expect(exclusion.status).toBe(201);
    const excluded = (await lead.get(`/api/campaigns/${campaign.id}/summary`)).body as SummaryResponse;
    expect(excluded.samples.rejectedByReason.excluded_window).toBeGreaterThan(0);
    // The window takes every sample in it, including ones a filter had rejected: the same as starting after it.
    const afterWindow = (await lead.get(`/api/campaigns/${campaign.id}/summary?from=${endOfFirstNight}`)).body as SummaryResponse;
    expect(excluded.samples.accepted).toBe(afterWindow.samples.accepted);
    expect(excluded.samples.read).toBe(all.samples.read);
    if (excluded.empty) throw new Error("expected statistics");
    expect(excluded.nights).toBe(all.nights - 1);
    expect(excluded.exclusions).toEqual([{ from: "2000-01-01T00:00:00.000Z", to: `${all.nightly[1]?.night}T14:00:00.000Z`, reason: "monitor misaligned" }]);
    const siteSummary = (await lead.get(`/api/sites/${site.id}/summary`)).body as SummaryResponse;
    expect(siteSummary.samples.accepted).toBe(excluded.samples.accepted);

    expect((await lead.delete(`/api/campaigns/${campaign.id}/exclusions/${exclusion.body.id}`).set(SAME_ORIGIN)).status).toBe(204);
    const restored = (await lead.get(`/api/campaigns/${campaign.id}/summary`)).body as SummaryResponse;
    expect(restored.samples.accepted).toBe(all.samples.accepted);
    const audit = await context.store.audit.list({ targetType: "exclusion", targetId: exclusion.body.id });
    expect(audit.map((row: { action: string }) => row.action)).toEqual(["exclusion.add", "exclusion.remove"]);
  });

  it("answers 400 for bad query parameters and an empty summary for a campaign without samples", async () => {
    const { campaign } = await createSiteAndCampaign(lead, monitor);
    expect((await lead.get(`/api/campaigns/${campaign.id}/summary?maxZenithDeg=abc`)).status).toBe(400);
    expect((await lead.get(`/api/campaigns/${campaign.id}/summary?from=yesterday`)).status).toBe(400);
    const empty = (await lead.get(`/api/campaigns/${campaign.id}/summary`)).body as SummaryResponse;
    expect(empty.empty).toBe(true);
    expect(empty.samples).toEqual({ read: 0, accepted: 0, rejected: 0, rejectedByReason: {} });
  });
});

describe("restarts", () => {
  it("marks an upload left ingesting by a dead process interrupted, keeps none of its samples, and retries it", async () => {
    const first = await createTestServer();
    const firstLead = await signedInAgent(first.app, "lead");
    const { campaign } = await createSiteAndCampaign(firstLead, monitor);
    // Stop the queue so the uploads stay queued, as if the process died before the worker got to them.
    await first.context.ingest.stop();
    const dying = (await postUpload(firstLead, campaign.id, nativeLog)).body.upload.id as number;
    const queued = (await postUpload(firstLead, campaign.id, join(DATA_SAMPLES, "r0-cm.csv"))).body.upload.id as number;
    // Simulate the dead ingest: the upload marked ingesting, samples written in a transaction never committed.
    simulateDeadIngest(first.context, dying, campaign.id);
    await first.context.close();

    const second = await createTestServer({ dataDir: first.dataDir });
    const secondLead = await signedInAgent(second.app, "lead");
    const interrupted = (await secondLead.get(`/api/uploads/${dying}`)).body;
    expect(interrupted.status).toBe("interrupted");
    expect(interrupted.error).toMatch(/server stopped/);
    const leftover = await countRows(second.context, "sample", { upload_id: dying });
    expect(Number(leftover)).toBe(0);
    // The one still queued was re-queued at start-up and ingests by itself.
    expect((await waitForUpload(secondLead, queued)).status).toBe("done");

    expect((await secondLead.post(`/api/uploads/${dying}/retry`).set(SAME_ORIGIN)).status).toBe(202);
    const retried = await waitForUpload(secondLead, dying);
    expect(retried.status).toBe("done");
    const stored = await countRows(second.context, "sample", { upload_id: dying });
    expect(Number(stored)).toBe(retried.samples.accepted);
  });
});

describe("upload limit", () => {
  it("answers 413 naming the limit in MB for a file over it", async () => {
    const small = await createTestServer({ env: { CALMCREST_MAX_UPLOAD_MB: "0.01" } });
    const smallLead = await signedInAgent(small.app, "lead");
    const { campaign } = await createSiteAndCampaign(smallLead, monitor);
    const response = await postUpload(smallLead, campaign.id, nativeLog);
    expect(response.status).toBe(413);
    expect(response.body.error.message).toContain("0.01 MB");
    expect(await tableRows(small.context, "upload")).toHaveLength(0);
  });
});
