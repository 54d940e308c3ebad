import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyzeLog } from "@calmcrest/seeing-stats/node";
import type { SummaryResponse, UploadAccepted, UploadPreview, UploadStatus, WholeFileCheck } from "@calmcrest/contracts";
import { createTestServer, SAME_ORIGIN, signedInAgent } from "../test-support";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, SAMPLES_SITE, waitForUpload } from "./test-helpers";

const { app } = await createTestServer();
const lead = await signedInAgent(app, "lead");

// The layouts of data-samples/format-*.* with the counts documented in data-samples/README.md.
const FORMATS = [
  { file: "format-two-columns.csv", mapping: { date_utc: "Date", time_utc: "Time" }, readOptions: {}, read: 90, accepted: 88, rejectedByReason: { unreadable_time: 1, missing_value: 1 }, preambleLines: 0 },
  { file: "format-whitespace.txt", mapping: undefined, readOptions: { delimiter: "whitespace" }, read: 80, accepted: 78, rejectedByReason: { wrong_field_count: 1, non_physical: 1 }, preambleLines: 0 },
  { file: "format-delimiter.csv", mapping: undefined, readOptions: { delimiter: ";" }, read: 50, accepted: 49, rejectedByReason: { non_physical: 1 }, preambleLines: 0 },
  { file: "format-preamble.txt", mapping: undefined, readOptions: { headerLine: 6 }, read: 60, accepted: 59, rejectedByReason: { non_physical: 1 }, preambleLines: 5 },
] as const;

describe("the formats monitors write", () => {
  for (const format of FORMATS) {
    it(`reads ${format.file} with its read options to the documented counts, in the check and the upload, and keeps the options with the upload`, async () => {
      const { campaign } = await createSiteAndCampaign(lead);
      const path = join(DATA_SAMPLES, format.file);
      const check = await lead
        .post(`/api/campaigns/${campaign.id}/uploads/check`)
        .set(SAME_ORIGIN)
        .field("mapping", JSON.stringify(format.mapping ?? {}))
        .field("readOptions", JSON.stringify(format.readOptions))
        .attach("file", path);
      expect(check.status, JSON.stringify(check.body)).toBe(200);
      expect(check.body as WholeFileCheck).toMatchObject({ rowsRead: format.read, usable: format.accepted, rejectedByReason: format.rejectedByReason, preambleLines: format.preambleLines });

      const posted = await postUpload(lead, campaign.id, path, format.file, format.mapping, { readOptions: format.readOptions });
      expect(posted.status, JSON.stringify(posted.body)).toBe(202);
      expect((posted.body as UploadAccepted).storedAnyway).toBeNull();
      const upload = await waitForUpload(lead, (posted.body as UploadAccepted).upload.id);
      expect(upload.status, upload.error ?? "").toBe("done");
      expect(upload.samples).toMatchObject({ read: format.read, accepted: format.accepted, rejectedByReason: format.rejectedByReason });
      expect(upload.readOptions).toMatchObject(format.readOptions);
    });
  }

  it("re-reads a stored file with the read options it was uploaded with", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const posted = await postUpload(lead, campaign.id, join(DATA_SAMPLES, "format-preamble.txt"), "format-preamble.txt", undefined, { readOptions: { headerLine: 6 } });
    const first = await waitForUpload(lead, (posted.body as UploadAccepted).upload.id);
    // A corrected pointing column only: the header line is not sent again, and the stored one is used.
    const reread = await lead.post(`/api/uploads/${first.id}/reread`).set(SAME_ORIGIN).send({ mapping: { zenith_deg: "zenith_deg" }, reason: "Check the zenith column again" });
    expect(reread.status, JSON.stringify(reread.body)).toBe(202);
    const second = await waitForUpload(lead, (reread.body as { upload: { id: number } }).upload.id);
    expect(second.samples).toMatchObject({ read: 60, accepted: 59 });
    expect(second.readOptions).toMatchObject({ headerLine: 6 });
  });

  it("answers 400 naming the option and how to write it for a bad delimiter or header line, and a header line past the end", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const path = join(DATA_SAMPLES, "format-preamble.txt");
    const pipe = await postUpload(lead, campaign.id, path, "format-preamble.txt", undefined, { readOptions: { delimiter: "|" } });
    expect(pipe.status).toBe(400);
    expect(pipe.body.error.message).toMatch(/delimiter must be ",", ";", "tab", "space" or "whitespace"/);
    const zero = await postUpload(lead, campaign.id, path, "format-preamble.txt", undefined, { readOptions: { headerLine: 0 } });
    expect(zero.status).toBe(400);
    expect(zero.body.error.message).toMatch(/headerLine must be at least 1/);
    const past = await postUpload(lead, campaign.id, path, "format-preamble.txt", undefined, { readOptions: { headerLine: 500 } });
    expect(past.status).toBe(400);
    expect(past.body.error.message).toMatch(/header line was set to line 500, but the file has only 66 lines/);
  });
});

describe("a file with no usable row", () => {
  // Julian dates read as ISO times: every row is unreadable_time.
  const jdLog = "jd,seeing_arcsec,zenith_deg\n2460837.45833333,0.8,20\n2460837.45972222,0.7,21\n";
  const mapping = { time_utc: "jd" };

  it("is refused with 422 saying what and how without 'store it anyway', and nothing is stored", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const posted = await postUpload(lead, campaign.id, Buffer.from(jdLog), "jd.csv", mapping);
    expect(posted.status).toBe(422);
    expect(posted.body.error.code).toBe("nothing_usable");
    expect(posted.body.error.message).toBe(
      'No row of jd.csv can be used: 2 rows read, all rejected (unreadable_time 2). Nothing was stored. Correct the mapping or how the file is read (time format, delimiter, header line) and send it again; to keep the raw file although it adds no sample, send it again with "store it anyway" (the field storeAnyway=true).',
    );
    const detail = await lead.get(`/api/campaigns/${campaign.id}`);
    expect(detail.body.uploads).toEqual([]);
    // The same file read as it is written goes in.
    const right = await postUpload(lead, campaign.id, Buffer.from(jdLog), "jd.csv", mapping, { readOptions: { timeFormat: "jd" } });
    expect(right.status).toBe(202);
  });

  it("is stored with 'store it anyway', and the answer and the upload's warnings say it adds nothing", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const posted = await postUpload(lead, campaign.id, Buffer.from(jdLog), "jd.csv", mapping, { storeAnyway: true });
    expect(posted.status).toBe(202);
    expect((posted.body as UploadAccepted).storedAnyway).toMatch(/^Stored as asked \("store it anyway"\), although no row of jd.csv can be used/);
    const upload: UploadStatus = await waitForUpload(lead, (posted.body as UploadAccepted).upload.id);
    expect(upload.samples).toMatchObject({ read: 2, accepted: 0, rejectedByReason: { unreadable_time: 2 } });
    expect(upload.warnings.map((warning) => warning.code)).toContain("many_rows_unusable");
  });

  it("answers 400 for a storeAnyway that is not true or false", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const request = lead.post(`/api/campaigns/${campaign.id}/uploads`).set(SAME_ORIGIN).field("mapping", JSON.stringify(mapping)).field("storeAnyway", "yes please");
    const answer = await request.attach("file", Buffer.from(jdLog), "jd.csv");
    expect(answer.status).toBe(400);
    expect(answer.body.error.message).toMatch(/storeAnyway must be "true" or "false"/);
  });
});

describe("a file measured at another wavelength than the campaign's monitor", () => {
  const seeingLog = join(DATA_SAMPLES, "wizard-fwhm-airmass.csv");

  it("is scaled to 500 nm from the wavelength in its read options, in the preview and in the stored statistics", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const preview = async (readOptions: object) =>
      (
        await lead
          .post(`/api/campaigns/${campaign.id}/uploads/preview`)
          .set(SAME_ORIGIN)
          .field("readOptions", JSON.stringify(readOptions))
          .attach("file", Buffer.from("Timestamp (UTC);FWHM [arcsec];Airmass\n2025-05-02 00:30:00;0,80;1,000\n"), "one.csv")
      ).body as UploadPreview;
    const at500 = (await preview({})).rows[0]?.sample?.seeingArcsec ?? Number.NaN;
    const at650 = (await preview({ wavelengthNm: 650 })).rows[0]?.sample?.seeingArcsec ?? Number.NaN;
    // Seeing ∝ λ^(-1/5) (Kolmogorov turbulence; shared/domain/seeing-physics.md): 0.80″ at 650 nm is 0.80 (650/500)^(1/5) ″ at 500 nm.
    expect(at500).toBeCloseTo(0.8, 12);
    expect(at650).toBeCloseTo(0.8 * (650 / 500) ** 0.2, 12);

    const posted = await postUpload(lead, campaign.id, seeingLog, "wizard-fwhm-airmass.csv", undefined, { readOptions: { wavelengthNm: 650 } });
    const upload = await waitForUpload(lead, (posted.body as UploadAccepted).upload.id);
    expect(upload.readOptions.wavelengthNm).toBe(650);
    const summary = (await lead.get(`/api/campaigns/${campaign.id}/summary`)).body as SummaryResponse;
    const report = await analyzeLog(seeingLog, {
      monitor: { wavelengthNm: 650, response: "z-tilt" },
      site: { latitudeDeg: SAMPLES_SITE.latitude, longitudeDeg: SAMPLES_SITE.longitude, elevationM: SAMPLES_SITE.elevationM },
      summary: { longitudeDeg: SAMPLES_SITE.longitude },
    });
    if (summary.empty) throw new Error("expected statistics");
    // The same figures as the analyzer given --wavelength-nm 650.
    expect(summary.seeing).toEqual(report.seeing);
  });

  it("answers 400 for a wavelength outside 300–2500 nm, saying the range", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const posted = await postUpload(lead, campaign.id, seeingLog, "wizard-fwhm-airmass.csv", undefined, { readOptions: { wavelengthNm: 50 } });
    expect(posted.status).toBe(400);
    expect(posted.body.error.message).toMatch(/wavelengthNm must be between 300 and 2500 nm/);
  });
});
