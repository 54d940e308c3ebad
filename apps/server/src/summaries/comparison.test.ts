import { describe, expect, it } from "vitest";
import { DEFAULT_FILTERS, sortPositive } from "@calmcrest/seeing-stats";
import type { ComparedCampaign } from "@calmcrest/contracts";
import { computeComparison, computeComparisonPairs, mergeComparisonParts, type ComparisonItemInput, type ComparisonSettings } from "./comparison";

const OFFSETS = [0, 0.01, 0.03, 0.05];

/** Four samples a night from 21:00 UTC, 10 minutes apart, at level + 0, 0.01, 0.03, 0.05 (site at longitude 0). */
function nights(list: { month: number; days: number[]; level: number }[]): { timeMs: Float64Array; seeingArcsec: Float64Array } {
  const times: number[] = [];
  const seeing: number[] = [];
  for (const { month, days, level } of list) {
    for (const day of days) {
      OFFSETS.forEach((offset, step) => {
        times.push(Date.UTC(2025, month - 1, day, 21) + step * 600_000);
        seeing.push(level + offset);
      });
    }
  }
  return { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
}
const range = (first: number, last: number) => Array.from({ length: last - first + 1 }, (_, index) => first + index);

function campaign(id: number, heightAboveGroundM: number): ComparedCampaign {
  return {
    id,
    name: `Mast ${id}`,
    heightAboveGroundM,
    response: "z-tilt",
    responseName: "Tokovinin 2002, Z-tilt (PASP 114, 1156)",
    apertureMm: 60,
    baselineMm: 200,
    wavelengthNm: 500,
    pixelScaleArcsec: null,
    exposureMs: null,
    uploads: [],
    exclusions: [],
  };
}

function item(index: number, label: string, columns: { timeMs: Float64Array; seeingArcsec: Float64Array }, heightM: number): ComparisonItemInput {
  return {
    key: `site:${index}`,
    label,
    site: { id: index, name: label, latitude: -25, longitude: 0, elevationM: 4000 },
    campaignId: null,
    campaigns: [campaign(index, heightM)],
    selected: { ...columns, presorted: sortPositive(columns.seeingArcsec), stored: columns.seeingArcsec.length, rejectedByReason: {} },
    summaryContext: {},
  };
}

// Hand-built logs: North has 12 March nights at level 0.60 and 2 April nights at 1.00; South the same 12 March nights
// at 0.70 (0.10″ worse every night); East 5 March nights (5–9) at 0.90.
const north = item(1, "North", nights([{ month: 3, days: range(1, 12), level: 0.6 }, { month: 4, days: [1, 2], level: 1.0 }]), 6);
const south = item(2, "South", nights([{ month: 3, days: range(1, 12), level: 0.7 }]), 6);
const east = item(3, "East", nights([{ month: 3, days: range(5, 9), level: 0.9 }]), 2);
const settings: ComparisonSettings = {
  kind: "sites",
  resolved: { fromMs: null, toMs: null, from: null, to: null, filters: DEFAULT_FILTERS },
  telescope: { apertureM: null, bandNm: 500, outerScaleM: 25 },
  pairing: "nights",
  generatedAt: "2026-12-05T00:00:00.000Z",
};
const comparison = computeComparison([north, south, east], settings);

describe("computeComparison on hand-built logs", () => {
  it("gives the season-balanced median of an unequal month mix, worked by hand, beside the pooled one", () => {
    const row = comparison.rows[0]?.statistics;
    // Pooled: 56 samples, 48 in March (12 each of 0.60, 0.61, 0.63, 0.65) then 8 in April; type 7 at 27.5 → 0.63
    expect(row?.seeing.median).toBeCloseTo(0.63, 12);
    // Balanced: March's 48 samples weigh 1/48 each, April's 8 weigh 1/8: each month 1 of a total 2. The running
    // weight reaches exactly half (1) at the last March value 0.65, so the median is the mean of 0.65 and the next, 1.00
    expect(row?.seasonBalanced.medianArcsec).toBeCloseTo(0.825, 12);
    expect(row?.seasonBalanced.monthsMissing).toHaveLength(10);
    expect(row?.seasonBalanced.monthsMissing).not.toContain("March");
    // Southern hemisphere: March–May (MAM) is autumn, 14 nights
    expect(row?.seasons.find((season) => season.code === "MAM")).toMatchObject({ name: "autumn", nights: 14 });
  });

  it("pairs North and South on their 12 common March nights, 0.10″ apart every night, and says so in words", () => {
    const pair = comparison.pairs.find((entry) => entry.a === 0 && entry.b === 1);
    expect(pair?.paired?.commonNights).toBe(12);
    // On the common nights: North 48 values → median 0.62 (type 7 between 0.61 and 0.63), South 0.72
    expect(pair?.paired?.medianA).toBeCloseTo(0.62, 12);
    expect(pair?.paired?.medianDifferenceArcsec).toBeCloseTo(-0.1, 12);
    // Every night differs by the same 0.10″, so every joint resample does too: an interval of zero width
    expect(pair?.paired?.ci95?.[0]).toBeCloseTo(-0.1, 12);
    expect(pair?.paired?.ci95?.[1]).toBeCloseTo(-0.1, 12);
    // 12 tied differences: normal approximation, variance 12·13·25/24 − (12³ − 12)/48 = 162.5 − 35.75 = 126.75,
    // z = −39/√126.75 = −3.464, p = 2Φ(−3.464) = 5.3e-4 (worked by hand; SciPy's method='approx' formula)
    expect(pair?.paired?.wilcoxon?.z).toBeCloseTo(-39 / Math.sqrt(126.75), 10);
    expect(pair?.paired?.sentence).toBe(
      "North is sharper than South by 0.10″ in median seeing (95 % interval, approximate 0.10–0.10″, 12 common nights; Wilcoxon signed-rank on nightly medians p < 0.001).",
    );
    // Unpaired: North's whole window (with April) 0.63 against South's 0.72
    expect(pair?.unpaired?.medianDifferenceArcsec).toBeCloseTo(-0.09, 12);
    expect(pair?.paired?.histogram).toEqual([{ lowArcsec: -0.1, highArcsec: -0.05, count: 12 }]);
  });

  it("gives no verdict on fewer than 10 common nights, and warns beside the rows and pairs concerned", () => {
    const pair = comparison.pairs.find((entry) => entry.a === 0 && entry.b === 2);
    expect(pair?.paired?.commonNights).toBe(5);
    expect(pair?.paired?.verdict).toBeNull();
    expect(pair?.paired?.sentence).toBe("No paired verdict for North and East: only 5 common nights; at least 10 are needed.");
    expect(pair?.warnings.map((warning) => warning.code)).toEqual(["few_overlap_months"]);
    const codes = comparison.rows.map((row) => row.warnings.map((warning) => warning.code));
    // North: 14 nights (approximate interval), April has 2 nights, heights differ (6 m against East's 2 m); East: 5 nights, no interval
    expect(codes[0]).toEqual(["approximate_interval", "thin_months", "different_heights"]);
    expect(codes[2]).toEqual(["too_few_nights", "different_heights"]);
    expect(comparison.rows[2]?.statistics?.seeing.medianCi95).toBeNull();
    expect(comparison.filters.standard).toBe(true);
    expect(comparison.warnings).toEqual([]);
  });

  it("gives the same answer, byte for byte as JSON, when the rows and the pairs are computed apart (two workers) and joined", () => {
    for (const pairing of ["nights", "bins"] as const) {
      const items = [north, south, east];
      const whole = computeComparison(items, { ...settings, pairing });
      const rowsPart = computeComparison(items, { ...settings, pairing }, "omit");
      // The rows part leaves every pair's figures out; the pairs part has them, in the same order.
      expect(rowsPart.pairs.every((pair) => pair.paired === null && pair.unpaired === null)).toBe(true);
      // Through JSON, as the parts travel from the workers.
      const joined = mergeComparisonParts(JSON.parse(JSON.stringify(rowsPart)), JSON.parse(JSON.stringify(computeComparisonPairs(items, { pairing }))));
      expect(JSON.stringify(joined)).toBe(JSON.stringify(whole));
    }
    expect(() => mergeComparisonParts(comparison, [])).toThrow(/3 pairs and 0 pair figures/);
  });
});
