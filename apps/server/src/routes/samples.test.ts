import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { nightLabel } from "@calmcrest/seeing-stats";
import type { SampleSeries, SummaryResponse } from "@calmcrest/contracts";
import { createTestServer, signedInAgent } from "../test-support";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, SAMPLES_SITE, waitForUpload } from "./test-helpers";

const { app } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const engineer = await signedInAgent(app, "engineer");
const { site, campaign } = await createSiteAndCampaign(lead);
await waitForUpload(lead, (await postUpload(lead, campaign.id, join(DATA_SAMPLES, "native-arcsec2.csv"))).body.upload.id);

describe("single samples for charts", () => {
  it("returns the accepted samples in time order, as many as the summary accepts", async () => {
    const summary = (await lead.get(`/api/campaigns/${campaign.id}/summary`)).body as SummaryResponse;
    const series = (await lead.get(`/api/campaigns/${campaign.id}/samples`)).body as SampleSeries;
    expect(series.total).toBe(summary.samples.accepted);
    expect(series.samples).toHaveLength(series.total);
    const times = series.samples.map((sample) => sample.timeMs);
    expect(times).toEqual([...times].sort((left, right) => left - right));
    // Variance logs give both axes.
    expect(series.samples.every((sample) => sample.seeingLongArcsec !== null && sample.seeingTransArcsec !== null)).toBe(true);
  });

  it("keeps one night by the engine's night label and thins to maxPoints", async () => {
    const all = (await lead.get(`/api/sites/${site.id}/samples`)).body as SampleSeries;
    const night = nightLabel(all.samples[0]?.timeMs ?? 0, SAMPLES_SITE.longitude);
    const oneNight = (await lead.get(`/api/sites/${site.id}/samples?night=${night}`)).body as SampleSeries;
    expect(oneNight.night).toBe(night);
    expect(oneNight.total).toBe(all.samples.filter((sample) => nightLabel(sample.timeMs, SAMPLES_SITE.longitude) === night).length);
    expect(oneNight.total).toBeGreaterThan(100);
    const thinned = (await lead.get(`/api/campaigns/${campaign.id}/samples?maxPoints=50`)).body as SampleSeries;
    expect(thinned.total).toBe(all.total);
    expect(thinned.samples).toHaveLength(50);
    expect(thinned.samples[0]).toEqual(all.samples[0]);
    expect(thinned.samples[49]).toEqual(all.samples[all.samples.length - 1]);
  });

  it("answers 404 to an engineer outside the campaign and 400 to a bad night", async () => {
    expect((await engineer.get(`/api/campaigns/${campaign.id}/samples`)).status).toBe(404);
    expect((await engineer.get(`/api/sites/${site.id}/samples`)).status).toBe(404);
    expect((await lead.get(`/api/campaigns/${campaign.id}/samples?night=last-tuesday`)).status).toBe(400);
  });

  it("answers 400 naming `to` for a window that ends before it starts, on the summary and samples routes alike", async () => {
    for (const path of [`/api/campaigns/${campaign.id}/summary`, `/api/sites/${site.id}/samples`]) {
      const response = await lead.get(`${path}?from=2025-06-02&to=2025-06-01`);
      expect(response.status).toBe(400);
      expect(Object.keys(response.body.error.fields)).toEqual(["to"]);
      expect(response.body.error.message).toMatch(/to must not be before from/);
    }
  });
});
