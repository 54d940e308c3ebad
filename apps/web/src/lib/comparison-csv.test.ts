import { describe, expect, it } from "vitest";
import type { ComparisonResponse } from "@calmcrest/contracts";
import { comparisonCsv, comparisonFileName } from "./comparison-csv";
import fixture from "./comparison.fixture.json";

// A real answer of GET /api/comparisons for two demo ridges, March to May 2025 (chart data trimmed).
const comparison = fixture as unknown as ComparisonResponse;

describe("the comparison CSV", () => {
  it("starts with # lines naming the window, filters, coefficient sets, telescope and generation time", () => {
    const lines = comparisonCsv(comparison).split("\n");
    const header = lines.filter((line) => line.startsWith("#"));
    expect(header[1]).toBe(`# generated ${comparison.generatedAt}`);
    expect(header).toContain("# window: 2025-03-01 to 2025-05-31 (UTC)");
    expect(header).toContain("# filters: zenith limit 60 deg; sun limit -18 deg; flux minimum none (the standard filters)");
    expect(header.find((line) => line.startsWith("# coefficient sets:"))).toBe("# coefficient sets: Sarazin & Roddier 1990 (A&A 227; 294); Tokovinin 2002; Z-tilt (PASP 114; 1156)");
    expect(header.find((line) => line.startsWith("# planned telescope:"))).toMatch(/outer scale L0 25 m/);
    // no comma in a # line, so a spreadsheet keeps each line in one cell
    for (const line of header) expect(line).not.toContain(",");
    const table = lines.slice(header.length);
    expect(table[0]).toMatch(/^"row","campaigns",/);
    expect(table[1]).toMatch(/^"Quartz Shoulder",/);
    expect(comparisonFileName(comparison)).toBe(`calmcrest-comparison-${comparison.generatedAt.slice(0, 10)}.csv`);
  });
  it("writes a row per site and per pair, and a negative difference as text a spreadsheet will not run", () => {
    const csv = comparisonCsv(comparison);
    const pairLine = csv.split("\n").find((line) => line.startsWith('"Quartz Shoulder","Tern Ridge"'));
    const difference = comparison.pairs[0]?.paired?.medianDifferenceArcsec ?? 0;
    expect(difference).toBeLessThan(0);
    expect(pairLine).toContain(`"'${Number(difference.toFixed(3))}"`);
  });
  it("prefixes a hostile site name so a spreadsheet shows it as text", () => {
    const hostile = { ...comparison, rows: comparison.rows.map((row, index) => (index === 0 ? { ...row, label: '=HYPERLINK("http://x.test","click")' } : row)) };
    expect(comparisonCsv(hostile)).toContain(`"'=HYPERLINK(""http://x.test"",""click"")"`);
  });
});
