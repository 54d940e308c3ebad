import { readdirSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { createSiteAndCampaign } from "../routes/test-helpers";
import { SAME_ORIGIN, createTestServer, signedInAgent } from "../test-support";
import { tmpDir } from "./raw-files.server";

const { app, context, dataDir } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const { campaign } = await createSiteAndCampaign(lead);
const url = `/api/campaigns/${campaign.id}/uploads`;
const LOG = "time_utc,seeing_arcsec,zenith_deg\r\n2025-01-01T03:00:00Z,0.81,10\r\n";
const part = (disposition: string) => `--XB\r\nContent-Disposition: form-data; name="file"; ${disposition}\r\nContent-Type: text/csv\r\n\r\n${LOG}`;
const send = (contentType: string, body: string) => lead.post(url).set(SAME_ORIGIN).set("Content-Type", contentType).send(body);

async function expectNothingStored() {
  const uploads = await context.db.knex("upload").where({ campaign_id: campaign.id }).count<{ n: number }[]>({ n: "*" }).first();
  expect(Number(uploads?.n)).toBe(0);
  const leftovers = () => {
    try {
      return readdirSync(tmpDir(dataDir));
    } catch {
      return []; // no tmp directory: nothing left
    }
  };
  // A cut-off transfer's temporary file is removed as the request fails (possibly just after the answer).
  await expect.poll(leftovers, { timeout: 2000 }).toEqual([]);
}

describe("a broken multipart upload answers 400 with what to do, and stores nothing", () => {
  it("names the missing boundary", async () => {
    const response = await send("multipart/form-data", part('filename="a.csv"'));
    expect(response.status).toBe(400);
    expect(response.body.error).toMatchObject({ code: "bad_upload", message: expect.stringMatching(/names no boundary/) });
    await expectNothingStored();
  });

  it("says a truncated body was cut off", async () => {
    const response = await send("multipart/form-data; boundary=XB", part('filename="a.csv"'));
    expect(response.status).toBe(400);
    expect(response.body.error).toMatchObject({ code: "bad_upload", message: expect.stringMatching(/cut off/) });
    await expectNothingStored();
  });

  it("refuses a NUL in the file name, written raw in the part header", async () => {
    const response = await send("multipart/form-data; boundary=XB", `${part('filename="a\u0000b.csv"')}--XB--\r\n`);
    expect(response.status).toBe(400);
    expect(response.body.error.message).toMatch(/control character in the file name/);
    await expectNothingStored();
  });

  it("refuses a NUL in the file name, written percent-encoded (filename*=UTF-8''…)", async () => {
    const response = await send("multipart/form-data; boundary=XB", `${part("filename*=UTF-8''a%00b.csv")}--XB--\r\n`);
    expect(response.status).toBe(400);
    expect(response.body.error).toMatchObject({ code: "bad_file_name", message: expect.stringMatching(/control character/) });
    await expectNothingStored();
  });

  it("still takes the same file with a plain name", async () => {
    const response = await send("multipart/form-data; boundary=XB", `${part('filename="a.csv"')}--XB--\r\n`);
    expect(response.status).toBe(202);
  });
});
