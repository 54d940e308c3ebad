import { describe, expect, it } from "vitest";
import type { UploadStatus } from "@calmcrest/contracts";
import { createSiteAndCampaign, postUpload, waitForUpload } from "../routes/test-helpers";
import { auditActions, countRows, createTestServer, SAME_ORIGIN, signedInAgent } from "../test-support";

const { app, context } = await createTestServer();
const lead = await signedInAgent(app, "lead");

/** A plain log of `rows` samples a minute apart. */
function log(rows: number, startIso: string): Buffer {
  const startMs = Date.parse(startIso);
  const lines = Array.from({ length: rows }, (_, index) => `${new Date(startMs + index * 60_000).toISOString()},0.8,10`);
  return Buffer.from(["time_utc,seeing_arcsec,zenith_deg", ...lines, ""].join("\n"));
}

/** Runs `action` while a 5 ms timer ticks; gives its result and the longest time between two ticks (how long the event loop was held). */
async function withLongestPause<T>(action: () => Promise<T>): Promise<{ result: T; longestPauseMs: number }> {
  let last = performance.now();
  let longestPauseMs = 0;
  const timer = setInterval(() => {
    const now = performance.now();
    longestPauseMs = Math.max(longestPauseMs, now - last);
    last = now;
  }, 5);
  try {
    const result = await action();
    const now = performance.now();
    longestPauseMs = Math.max(longestPauseMs, now - last);
    return { result, longestPauseMs };
  } finally {
    clearInterval(timer);
  }
}

const ROWS = 200_000;
/** Generous: moving 200 000 samples on the main thread held it for seconds; off it, the pauses are a few ms. */
const LONGEST_PAUSE_BOUND_MS = 250;

describe("withdrawing, restoring and re-reading a large upload", () => {
  it(`moves ${ROWS} samples off the main thread: the event loop never pauses ${LONGEST_PAUSE_BOUND_MS} ms, and every sample lands where it belongs`, async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const done = await waitForUpload(lead, (await postUpload(lead, campaign.id, log(ROWS, "2024-01-01T00:00:00Z"), "large.csv")).body.upload.id, 120_000);
    expect(done.samples).toMatchObject({ read: ROWS, accepted: ROWS });

    const withdrawn = await withLongestPause(() => lead.post(`/api/uploads/${done.id}/withdraw`).set(SAME_ORIGIN).send({ reason: "wrong monitor" }));
    expect(withdrawn.result.status).toBe(200);
    expect((withdrawn.result.body as UploadStatus).withdrawn?.reason).toBe("wrong monitor");
    expect(withdrawn.longestPauseMs).toBeLessThan(LONGEST_PAUSE_BOUND_MS);
    expect(await countRows(context, "sample", { campaign_id: campaign.id })).toBe(0);
    expect(await countRows(context, "withdrawn_sample", { upload_id: done.id })).toBe(ROWS);

    const restored = await withLongestPause(() => lead.post(`/api/uploads/${done.id}/restore`).set(SAME_ORIGIN).send({}));
    expect(restored.result.status).toBe(200);
    expect(restored.longestPauseMs).toBeLessThan(LONGEST_PAUSE_BOUND_MS);
    expect(await countRows(context, "sample", { campaign_id: campaign.id })).toBe(ROWS);
    expect(await countRows(context, "withdrawn_sample", { upload_id: done.id })).toBe(0);

    const reread = await withLongestPause(() => lead.post(`/api/uploads/${done.id}/reread`).set(SAME_ORIGIN).send({ reason: "read it again" }));
    expect(reread.result.status).toBe(202);
    expect(reread.longestPauseMs).toBeLessThan(LONGEST_PAUSE_BOUND_MS);
    const again = await waitForUpload(lead, (reread.result.body as { upload: { id: number } }).upload.id, 120_000);
    expect(again.samples).toMatchObject({ read: ROWS, accepted: ROWS });
    expect(await countRows(context, "sample", { upload_id: again.id })).toBe(ROWS);
    expect(await countRows(context, "withdrawn_sample", { upload_id: done.id })).toBe(ROWS);
    expect(await auditActions(context, "upload", done.id)).toEqual(["upload.create", "upload.withdraw", "upload.restore", "upload.withdraw"]);
  }, 240_000);

  it("lets a write that arrives during a withdrawal wait for it without blocking, and commits both", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const done = await waitForUpload(lead, (await postUpload(lead, campaign.id, log(20_000, "2023-01-01T00:00:00Z"), "medium.csv")).body.upload.id, 60_000);
    const withdrawal = lead.post(`/api/uploads/${done.id}/withdraw`).set(SAME_ORIGIN).send({ reason: "test" });
    const site = lead.post("/api/sites").set(SAME_ORIGIN).send({ name: "Waiting Ridge", latitude: -30, longitude: -70, elevationM: 2000 });
    const [withdrawn, created] = await Promise.all([withdrawal, site]);
    expect(withdrawn.status).toBe(200);
    expect(created.status).toBe(201);
    expect(await countRows(context, "withdrawn_sample", { upload_id: done.id })).toBe(20_000);
    expect(await countRows(context, "site", { name: "Waiting Ridge" })).toBe(1);
  }, 120_000);
});
