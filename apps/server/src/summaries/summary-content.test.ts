import { describe, expect, it } from "vitest";
import type { SiteDetail, SummaryResponse } from "@calmcrest/contracts";
import { createTestServer, SAME_ORIGIN, signedInAgent } from "../test-support";
import { postUpload, SAMPLES_SITE, waitForUpload } from "../routes/test-helpers";

// What a site summary says beyond the pooled figures: warnings for pooled response sets and monitor heights with
// the figures per campaign and per height, τ0/θ0 at zenith and 500 nm, and the anisotropy filter.

const { app } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const NO_SUN_LIMIT = "sunMaxDeg=90";

/**
 * An invented log: 12 nights of 10 samples (arcsec² variances giving about 0.8–1″), τ0 3.0 ms and θ0 1.0″ at a
 * 60° zenith angle, and every tenth sample anisotropic (longitudinal variance 4× the transverse one).
 */
function invented(dayOffset: number): string {
  const lines = ["time_utc,var_long_arcsec2,var_trans_arcsec2,zenith_deg,tau0_ms,theta0_arcsec"];
  for (let night = 0; night < 12; night += 1) {
    for (let sample = 0; sample < 10; sample += 1) {
      const time = new Date(Date.UTC(2025, 4, 1 + night + dayOffset, 3, sample * 10)).toISOString();
      const variance = 0.05 + 0.002 * sample;
      lines.push(`${time},${sample === 9 ? variance * 4 : variance},${variance},60,3.0,1.0`);
    }
  }
  return `${lines.join("\n")}\n`;
}

async function campaignAt(siteId: number, name: string, monitor: Record<string, unknown>, dayOffset: number): Promise<number> {
  const created = await lead.post(`/api/sites/${siteId}/campaigns`).set(SAME_ORIGIN).send({ name, monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, ...monitor } });
  expect(created.status).toBe(201);
  const campaignId = (created.body as { id: number }).id;
  const posted = await postUpload(lead, campaignId, Buffer.from(invented(dayOffset)), `${name}.csv`);
  expect(posted.status).toBe(202);
  expect((await waitForUpload(lead, posted.body.upload.id)).status).toBe("done");
  return campaignId;
}

async function summaryOf(path: string): Promise<Extract<SummaryResponse, { empty: false }>> {
  const response = await lead.get(path);
  expect(response.status).toBe(200);
  const summary = response.body as SummaryResponse;
  if (summary.empty) throw new Error("expected statistics");
  return summary;
}

const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...SAMPLES_SITE, name: "Pooled Ridge" })).body as SiteDetail;
const low = await campaignAt(site.id, "Low mast", { response: "z-tilt", heightAboveGroundM: 5 }, 0);
const high = await campaignAt(site.id, "High tower", { response: "g-tilt", heightAboveGroundM: 20 }, 20);

describe("a site summary over campaigns that differ", () => {

  it("warns with a code and a sentence and gives the figures per campaign and per height", async () => {
    const summary = await summaryOf(`/api/sites/${site.id}/summary?${NO_SUN_LIMIT}`);
    const codes = summary.warnings.map((warning) => warning.code);
    expect(codes).toContain("mixed_response_sets");
    expect(codes).toContain("mixed_monitor_heights");
    expect(summary.warnings.find((warning) => warning.code === "mixed_monitor_heights")?.message).toMatch(/5 m, 20 m/);
    expect(summary.byCampaign?.map((group) => group.campaignIds)).toEqual([[low], [high]]);
    expect(summary.byCampaign?.[1]?.label).toMatch(/High tower .*G-tilt/);
    expect(summary.byHeight?.map((group) => group.label)).toEqual(["monitor 5 m above ground", "monitor 20 m above ground"]);
    // Each campaign keeps 108 of its 120 samples (12 anisotropic ones left out); the groups add up to the pool.
    expect(summary.byCampaign?.map((group) => group.samples)).toEqual([108, 108]);
    expect(summary.samples.accepted).toBe(216);
    // The same variances read with G-tilt coefficients give 7–10 % more seeing (seeing-physics.md §9 #9: 0.5298″ G against 0.4959″ Z).
    const [zTilt, gTilt] = summary.byCampaign ?? [];
    expect((gTilt?.median ?? 0) / (zTilt?.median ?? 1)).toBeGreaterThan(1.05);
    expect(zTilt?.nights).toBe(12);
    expect(zTilt?.interval?.status).toBe("approximate");
  });

  it("gives no groups and no pooling warning for one campaign", async () => {
    const summary = await summaryOf(`/api/campaigns/${low}/summary?${NO_SUN_LIMIT}`);
    expect(summary.byCampaign).toBeNull();
    expect(summary.byHeight).toBeNull();
    expect(summary.warnings.map((warning) => warning.code)).not.toContain("mixed_response_sets");
  });

  it("summarises τ0 and θ0 at zenith and 500 nm", async () => {
    const summary = await summaryOf(`/api/campaigns/${low}/summary?${NO_SUN_LIMIT}`);
    // τ0 ∝ (cos z)^(3/5), θ0 ∝ (cos z)^(8/5) (seeing-physics.md §5; Kellerer & Tokovinin 2007 for τ0, Roddier 1981 for θ0):
    // 3.0 ms at 60° → 3.0 × 0.5^(−0.6) = 4.547 ms; 1.0″ at 60° → 0.5^(−1.6) = 3.031″ (the engine's worked examples).
    expect(summary.tau0?.median).toBeCloseTo(4.547, 3);
    expect(summary.theta0?.median).toBeCloseTo(3.031, 3);
    expect(summary.tau0?.samples).toBe(108);
  });

  it("leaves anisotropic samples out by default and keeps them with keepAnisotropic=true", async () => {
    const standard = await summaryOf(`/api/campaigns/${low}/summary?${NO_SUN_LIMIT}`);
    expect(standard.samples.rejectedByReason.anisotropic).toBe(12);
    expect(standard.filters.leaveOutAnisotropic).toBe(true);
    const kept = await summaryOf(`/api/campaigns/${low}/summary?${NO_SUN_LIMIT}&keepAnisotropic=true`);
    expect(kept.samples.accepted).toBe(120);
    expect(kept.samples.rejectedByReason.anisotropic).toBeUndefined();
    expect(kept.filters.leaveOutAnisotropic).toBe(false);
    expect(kept.seeing.p90).toBeGreaterThan(standard.seeing.p90);
    expect((await lead.get(`/api/campaigns/${low}/summary?keepAnisotropic=maybe`)).status).toBe(400);
  });

  it("names the seasons for the site's hemisphere", async () => {
    const summary = await summaryOf(`/api/sites/${site.id}/summary?${NO_SUN_LIMIT}`);
    // May at 27° S is southern autumn.
    expect(summary.seasons.find((season) => season.code === "MAM")?.name).toBe("autumn");
  });

  it("asks to check the longitude's sign when the sun filter drops night data a mirrored longitude would keep", async () => {
    // The same night-time log (03:00–04:30 UTC, 23:00 local at 70° W) at a ridge entered as 70° E.
    const eastern = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...SAMPLES_SITE, name: "Mirrored Ridge", longitude: -SAMPLES_SITE.longitude })).body as SiteDetail;
    await campaignAt(eastern.id, "Mirrored mast", { response: "z-tilt", heightAboveGroundM: 5 }, 0);
    const response = await lead.get(`/api/sites/${eastern.id}/summary`);
    const summary = response.body as SummaryResponse;
    // Every sample is daytime at 70° E, so nothing passes; the empty answer still says why that may be.
    expect(summary.empty).toBe(true);
    expect(summary.samples.rejectedByReason.sun_above_limit).toBe(120);
    expect(summary.warnings.map((warning) => warning.code)).toContain("longitude_sign");
    expect(summary.warnings.find((warning) => warning.code === "longitude_sign")?.message).toMatch(/rejects 100 % .* check the sign of the longitude \(east positive\)/);
    const right = await summaryOf(`/api/sites/${site.id}/summary`);
    expect(right.warnings.map((warning) => warning.code)).not.toContain("longitude_sign");
  });
});
