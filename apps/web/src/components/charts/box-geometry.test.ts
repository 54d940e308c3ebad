import { describe, expect, it } from "vitest";
import { boxGeometry } from "./box-geometry";

describe("box plot geometry", () => {
  it("places each quantile linearly between the p90 top and the p10 bottom of its bar", () => {
    // A bar from row 100 (p90 = 1.4″) to row 300 (p10 = 0.6″): 250 px per arcsec.
    const rows = boxGeometry(100, 200, { p10: 0.6, p25: 0.7, median: 0.9, p75: 1.1, p90: 1.4 });
    expect(rows.whiskerTop).toBeCloseTo(100, 9);
    expect(rows.boxTop).toBeCloseTo(175, 9);
    expect(rows.median).toBeCloseTo(225, 9);
    expect(rows.boxBottom).toBeCloseTo(275, 9);
    expect(rows.whiskerBottom).toBeCloseTo(300, 9);
  });

  it("draws a month whose quantiles are all equal as a flat line in the middle", () => {
    const rows = boxGeometry(50, 0, { p10: 1, p25: 1, median: 1, p75: 1, p90: 1 });
    expect(rows.median).toBe(50);
  });
});
