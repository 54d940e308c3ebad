// The hostile corpus (tests/hostile/, expected outcomes in its README and expected.json) through the real
// upload API and through the analyzer's engine: status, counts by reason, rows read = data lines, warnings,
// and a server that still answers afterwards.
import { readdirSync, readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import request from "supertest";
import { describe, expect, it } from "vitest";
import { analyzeLog } from "@calmcrest/seeing-stats/node";
import { LogFormatError } from "@calmcrest/seeing-stats";
import { countDataLines, LARGE_CASES, type Expected } from "../../../tests/hostile/large";
import { createTestServer, signedInAgent } from "./test-support";
import { createSiteAndCampaign, postUpload, waitForUpload } from "./routes/test-helpers";

const HOSTILE = join(dirname(fileURLToPath(import.meta.url)), "../../../tests/hostile");
const expectations = JSON.parse(readFileSync(join(HOSTILE, "expected.json"), "utf8")) as Record<string, Expected & { tries: string }>;
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 };

const { app } = await createTestServer();
const lead = await signedInAgent(app, "lead");

const cases: { name: string; tries: string; content: () => Buffer; expected: Expected }[] = [
  ...Object.entries(expectations).map(([name, expected]) => ({ name, tries: expected.tries, content: () => readFileSync(join(HOSTILE, name)), expected })),
  ...LARGE_CASES.map((entry) => ({ name: entry.name, tries: entry.tries, content: () => entry.build(), expected: entry.expected })),
];

describe("the hostile corpus", () => {
  it("holds at least 60 files, each with an expected outcome", () => {
    const files = readdirSync(HOSTILE).filter((name) => /^\d\d-/.test(name));
    expect(files.length).toBeGreaterThanOrEqual(60);
    expect(files.sort()).toEqual(Object.keys(expectations).sort());
  });

  for (const entry of cases) {
    it(`${entry.name} (${entry.tries}): ${entry.expected.status === 400 ? "refused with 400" : `done, ${entry.expected.accepted} accepted`}`, { timeout: 120_000 }, async () => {
      const content = entry.content();
      const { campaign } = await createSiteAndCampaign(lead, monitor);
      const { expected } = entry;
      // A file with no usable row is refused unless the sender says "store it anyway"; the corpus checks its reading, so it says so.
      const nothingUsable = expected.status !== 400 && expected.accepted === 0;
      if (nothingUsable) expect((await postUpload(lead, campaign.id, content, entry.name)).status).toBe(422);
      const posted = await postUpload(lead, campaign.id, content, entry.name, undefined, nothingUsable ? { storeAnyway: true } : {});
      if (expected.status === 400) {
        expect(posted.status, JSON.stringify(posted.body).slice(0, 300)).toBe(400);
        const message = (posted.body as { error: { message: string } }).error.message;
        expect(message).toMatch(new RegExp(expected.message));
        expect(message.length).toBeLessThanOrEqual(expected.maxMessageChars ?? 1000);
      } else {
        expect(posted.status, JSON.stringify(posted.body).slice(0, 300)).toBe(202);
        const upload = await waitForUpload(lead, (posted.body as { upload: { id: number } }).upload.id, 90_000);
        expect(upload.status, upload.error ?? "").toBe("done");
        const dataLines = countDataLines(content);
        expect(upload.samples.read).toBe(dataLines);
        expect(upload.samples.accepted + upload.samples.rejected).toBe(dataLines);
        expect(upload.samples.accepted).toBe(expected.accepted);
        expect(upload.samples.rejectedByReason).toEqual(expected.rejectedByReason);
        expect(upload.warnings.length > 0, upload.warnings.map((warning) => warning.message).join(" / ")).toBe(expected.warned);
        // The campaign page lists the same upload with the same warnings.
        const listed = (await lead.get(`/api/campaigns/${campaign.id}`)).body as { uploads: { id: number; warnings: unknown[] }[] };
        expect(listed.uploads.find((item) => item.id === upload.id)?.warnings).toEqual(upload.warnings);
      }
      expect((await request(app).get("/api/health")).status).toBe(200);
    });
  }
});

describe("the hostile corpus through the analyzer's engine", () => {
  for (const entry of cases) {
    it(`${entry.name}: the same outcome as the upload`, { timeout: 60_000 }, async () => {
      const content = entry.content();
      const run = analyzeLog(Readable.from([content]), { monitor: { ...monitor, response: "z-tilt" } });
      const { expected } = entry;
      if (expected.status === 400) {
        const error: unknown = await run.then(
          () => null,
          (problem: unknown) => problem,
        );
        expect(error).toBeInstanceOf(LogFormatError);
        if (error instanceof LogFormatError) {
          expect(`${error.message} ${error.hint}`).toMatch(new RegExp(expected.message));
          expect(error.message.length + error.hint.length).toBeLessThanOrEqual(expected.maxMessageChars ?? 1000);
        }
        return;
      }
      const report = await run;
      expect(report.samples.read).toBe(countDataLines(content));
      expect(report.samples.accepted).toBe(expected.accepted);
      expect(report.samples.rejectedByReason).toEqual(expected.rejectedByReason);
      const fileWarnings = report.warnings.filter((warning) => ["lines_not_split", "many_rows_unusable", "no_data_rows"].includes(warning.code));
      expect(fileWarnings.length > 0).toBe(expected.warned);
    });
  }
});
