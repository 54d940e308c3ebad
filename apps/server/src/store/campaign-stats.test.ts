import { describe, expect, it } from "vitest";
import type { CampaignDetail } from "@calmcrest/contracts";
import { createSiteAndCampaign, postUpload, waitForUpload } from "../routes/test-helpers";
import { createTestServer, signedInAgent } from "../test-support";

const { app } = await createTestServer();
const lead = await signedInAgent(app, "lead");

describe("a campaign's counts", () => {
  it("give the first and last sample times (two index look-ups), and none for a campaign without samples", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const empty = (await lead.get(`/api/campaigns/${campaign.id}`)).body as CampaignDetail;
    expect(empty).toMatchObject({ sampleCount: 0, firstSampleAt: null, lastSampleAt: null });
    // Out of time order in the file: the first and last times are not the first and last rows.
    const rows = ["2025-04-02T03:00:00Z", "2025-04-01T01:00:00Z", "2025-04-03T05:30:00Z", "2025-04-02T00:00:00Z"];
    const file = Buffer.from(["time_utc,seeing_arcsec,zenith_deg", ...rows.map((time) => `${time},0.8,10`), ""].join("\n"));
    await waitForUpload(lead, (await postUpload(lead, campaign.id, file, "unordered.csv")).body.upload.id);
    const filled = (await lead.get(`/api/campaigns/${campaign.id}`)).body as CampaignDetail;
    expect(filled).toMatchObject({ sampleCount: 4, firstSampleAt: "2025-04-01T01:00:00.000Z", lastSampleAt: "2025-04-03T05:30:00.000Z" });
  });
});
