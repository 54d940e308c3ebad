import { join } from "node:path";
import { describe, expect, it } from "vitest";
import type { SummaryResponse } from "@calmcrest/contracts";
import { createTestServer, signedInAgent } from "../test-support";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, waitForUpload } from "./test-helpers";

// Every file of data-samples/ through the upload API, against the counts documented in data-samples/README.md
// (which are what the analyzer reports). Rejections split in two: row-level ones (and duplicates) at ingest,
// filter ones (zenith, sun, flux) at summary time with the query's settings.

const { app } = await createTestServer();
const lead = await signedInAgent(app, "lead");

interface Case {
  file: string;
  monitor: Record<string, unknown>;
  ingest: { read: number; accepted: number; rejectedByReason: Record<string, number> };
  query: string;
  summary: { read: number; accepted: number; rejectedByReason: Record<string, number> };
}

const cases: Case[] = [
  {
    file: "native-arcsec2.csv",
    monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 },
    ingest: { read: 595, accepted: 588, rejectedByReason: { unreadable_time: 2, missing_value: 1, non_physical: 3, duplicate_time: 1 } },
    // README row 1: --site-lat -27.42 --site-lon -70.15 --min-flux 1000
    query: "minFlux=1000",
    summary: {
      read: 595,
      accepted: 585,
      rejectedByReason: { unreadable_time: 2, missing_value: 1, non_physical: 3, zenith_limit: 1, duplicate_time: 1, sun_above_limit: 1, low_flux: 1 },
    },
  },
  {
    file: "native-arcsec2.csv",
    monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 },
    ingest: { read: 595, accepted: 588, rejectedByReason: { unreadable_time: 2, missing_value: 1, non_physical: 3, duplicate_time: 1 } },
    // README row 2 has no night filter; a sun limit of +90° turns it off here.
    query: "sunMaxDeg=90",
    summary: { read: 595, accepted: 587, rejectedByReason: { unreadable_time: 2, missing_value: 1, non_physical: 3, zenith_limit: 1, duplicate_time: 1 } },
  },
  {
    file: "native-px2.tsv",
    monitor: { apertureMm: 50, baselineMm: 180, wavelengthNm: 550, pixelScaleArcsec: 0.65 },
    ingest: { read: 323, accepted: 323, rejectedByReason: {} },
    query: "",
    summary: { read: 323, accepted: 323, rejectedByReason: {} },
  },
  {
    file: "wizard-fwhm-airmass.csv",
    monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 },
    ingest: { read: 400, accepted: 398, rejectedByReason: { non_physical: 1, missing_value: 1 } },
    // README: no flags, so no night filter (this export has evening rows in twilight at the sample site).
    query: "sunMaxDeg=90",
    summary: { read: 400, accepted: 397, rejectedByReason: { non_physical: 1, missing_value: 1, zenith_limit: 1 } },
  },
  {
    file: "r0-cm.csv",
    monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 },
    ingest: { read: 300, accepted: 299, rejectedByReason: { non_physical: 1 } },
    query: "",
    summary: { read: 300, accepted: 299, rejectedByReason: { non_physical: 1 } },
  },
  {
    file: "native-interlaced.csv",
    monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, exposureMs: 5 },
    // The damaged 2τ cells are row-level rejections; the noise-dominated pairs are accepted uncorrected.
    ingest: { read: 282, accepted: 280, rejectedByReason: { missing_value: 1, non_physical: 1 } },
    query: "",
    summary: { read: 282, accepted: 280, rejectedByReason: { missing_value: 1, non_physical: 1 } },
  },
];

describe("the data-samples logs through the upload API", () => {
  for (const testCase of cases) {
    it(`gives the documented counts for ${testCase.file}${testCase.query ? ` with ${testCase.query}` : ""}`, async () => {
      const { campaign } = await createSiteAndCampaign(lead, testCase.monitor);
      const posted = await postUpload(lead, campaign.id, join(DATA_SAMPLES, testCase.file));
      expect(posted.status).toBe(202);
      const upload = await waitForUpload(lead, posted.body.upload.id);
      expect(upload.status).toBe("done");
      expect(upload.samples).toEqual({ ...testCase.ingest, rejected: testCase.ingest.read - testCase.ingest.accepted });
      const summary = (await lead.get(`/api/campaigns/${campaign.id}/summary?${testCase.query}`)).body as SummaryResponse;
      expect(summary.samples).toEqual({ ...testCase.summary, rejected: testCase.summary.read - testCase.summary.accepted });
    });
  }

  it("accepts a mapping that names the 2x variance fields, and reads the file without them when they are set to null", async () => {
    // A sent mapping overrides only the fields it names (issue 12): leaving the 2τ fields out would still match
    // them by name, so "without them" is said with null.
    const base = { time_utc: "time_utc", var_long_arcsec2: "var_long_arcsec2", var_trans_arcsec2: "var_trans_arcsec2", zenith_deg: "zenith_deg", flux: "flux" };
    const singleExposure = { ...base, var_long_2x_arcsec2: null, var_trans_2x_arcsec2: null };
    const interlaced = { ...base, var_long_2x_arcsec2: "var_long_2x_arcsec2", var_trans_2x_arcsec2: "var_trans_2x_arcsec2" };
    const file = join(DATA_SAMPLES, "native-interlaced.csv");
    const withPairs = await createSiteAndCampaign(lead);
    const postedPairs = await postUpload(lead, withPairs.campaign.id, file, "log.csv", interlaced);
    expect(postedPairs.status, JSON.stringify(postedPairs.body)).toBe(202);
    const pairs = await waitForUpload(lead, postedPairs.body.upload.id);
    expect(pairs.samples).toEqual({ read: 282, accepted: 280, rejected: 2, rejectedByReason: { missing_value: 1, non_physical: 1 } });
    // Without the 2τ columns the two rows with damaged 2τ cells are readable, and the seeing is the 5 ms one.
    const withoutPairs = await createSiteAndCampaign(lead);
    const postedSingle = await postUpload(lead, withoutPairs.campaign.id, file, "log.csv", singleExposure);
    expect(postedSingle.status).toBe(202);
    const single = await waitForUpload(lead, postedSingle.body.upload.id);
    expect(single.samples).toEqual({ read: 282, accepted: 282, rejected: 0, rejectedByReason: {} });
    const medianOf = async (campaignId: number) => {
      const summary = (await lead.get(`/api/campaigns/${campaignId}/summary`)).body as SummaryResponse;
      return summary.empty ? Number.NaN : summary.seeing.median;
    };
    // A finite exposure smooths the image motion, so the extrapolated seeing is larger (seeing-physics.md §3.1).
    expect(await medianOf(withPairs.campaign.id)).toBeGreaterThan((await medianOf(withoutPairs.campaign.id)) * 1.01);
  });

  it("refuses the three unreadable files with the analyzer's message", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const expected: [string, RegExp][] = [
      ["malformed-binary.bin", /The file is not a text log/],
      ["malformed-no-time.csv", /time_utc/],
      ["malformed-empty.csv", /The file is empty/],
    ];
    for (const [file, message] of expected) {
      const response = await postUpload(lead, campaign.id, join(DATA_SAMPLES, file));
      expect(response.status).toBe(400);
      expect(response.body.error.message).toMatch(message);
    }
  });
});
