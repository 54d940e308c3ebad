import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { countRows, createTestServer, SAME_ORIGIN, signedInAgent, tableRows, userIdOf } from "../test-support";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, waitForUpload } from "./test-helpers";

// Requests that race each other against one server (Promise.all of real HTTP requests on one app): nothing
// may be ingested twice, and a lost race is a 409, never a 500.

const { app, context } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const admin = await signedInAgent(app, "admin");
const engineer = await signedInAgent(app, "engineer");
const nativeLog = readFileSync(join(DATA_SAMPLES, "native-arcsec2.csv"), "utf8");
const TRIALS = 4;

/** The native sample log with one comment line more, so every trial sends different bytes. */
const logOfTrial = (trial: number) => Buffer.from(`# trial ${trial}\n${nativeLog}`);

describe("two retries of one failed upload at once", () => {
  it("queue it once: one answers 202, the other 409, and the samples are stored once", async () => {
    for (let trial = 0; trial < TRIALS; trial += 1) {
      // A fresh campaign each time: the samples of an earlier trial would make every row a duplicate_time.
      const { campaign } = await createSiteAndCampaign(lead);
      context.ingest.testHooks.failAfterSamples = 10;
      const failed = await waitForUpload(lead, (await postUpload(lead, campaign.id, logOfTrial(trial))).body.upload.id);
      context.ingest.testHooks.failAfterSamples = undefined;
      expect(failed.status).toBe("failed");

      const answers = await Promise.all([lead.post(`/api/uploads/${failed.id}/retry`).set(SAME_ORIGIN), lead.post(`/api/uploads/${failed.id}/retry`).set(SAME_ORIGIN)]);
      expect(answers.map((answer) => answer.status).sort()).toEqual([202, 409]);
      const refused = answers.find((answer) => answer.status === 409);
      expect(refused?.body.error.code).toBe("not_retryable");

      const done = await waitForUpload(lead, failed.id);
      await context.ingest.idle();
      expect(done.status).toBe("done");
      // Ingested once: a second pass would count every row as duplicate_time and leave accepted at 0. The file's
      // own one duplicate (line 51, data-samples/README.md) is the only one.
      expect(done.samples.accepted).toBeGreaterThan(100);
      expect(done.samples.rejectedByReason.duplicate_time).toBe(1);
      expect(await countRows(context, "sample", { upload_id: failed.id })).toBe(done.samples.accepted);
      const actions = (await context.store.audit.list({ targetType: "upload", targetId: failed.id })).map((row) => row.action);
      expect(actions).toEqual(["upload.create", "upload.retry"]);
    }
  });
});

describe("the same file uploaded from two sessions at once", () => {
  it("is stored once: one answers 202, the other 409 with the existing upload, never 500", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    await admin.post(`/api/campaigns/${campaign.id}/members`).set(SAME_ORIGIN).send({ userId: await userIdOf(context, "engineer@calmcrest.test") });
    for (let trial = 0; trial < TRIALS; trial += 1) {
      const file = logOfTrial(100 + trial);
      const answers = await Promise.all([postUpload(lead, campaign.id, file, "same.csv"), postUpload(engineer, campaign.id, file, "same.csv")]);
      expect(answers.map((answer) => answer.status).sort()).toEqual([202, 409]);
      const accepted = answers.find((answer) => answer.status === 202);
      const duplicate = answers.find((answer) => answer.status === 409);
      expect(duplicate?.body.error.code).toBe("duplicate_upload");
      expect(duplicate?.body.upload.id).toBe(accepted?.body.upload.id);
      expect((await waitForUpload(lead, accepted?.body.upload.id)).status).toBe("done");
    }
    expect(await tableRows(context, "upload", { campaign_id: campaign.id })).toHaveLength(TRIALS);
  });
});
