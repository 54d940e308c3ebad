import { describe, expect, it } from 'vitest';
import { comparePairedNights, type PairedComparison } from '../summary/comparePairedNights.js';
import type { SampleColumns } from '../summary/summarizeSeeing.js';
import { comparisonWarnings } from './comparisonWarnings.js';
import { describePairedVerdict, formatPValue, formatSignedArcsec } from './describePairedVerdict.js';
import { differenceHistogram } from './differenceHistogram.js';

/** Four samples a night from 21:00 UTC, 10 minutes apart, at level + 0, 0.01, 0.03, 0.05 (nightly median level + 0.02). */
function nightsAt(days: number[], level: (day: number) => number): SampleColumns {
  const times: number[] = [];
  const seeing: number[] = [];
  for (const day of days) {
    for (const [step, offset] of [0, 0.01, 0.03, 0.05].entries()) {
      times.push(Date.UTC(2025, 2, day, 21) + step * 10 * 60_000);
      seeing.push(level(day) + offset);
    }
  }
  return { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
}
const days = (first: number, last: number): number[] => Array.from({ length: last - first + 1 }, (_, index) => first + index);

/** A paired comparison with the fields the sentence reads, the rest neutral. */
function paired(fields: Partial<PairedComparison>): PairedComparison {
  return {
    commonNights: 143,
    matching: 'nights',
    binMinutes: null,
    samplesA: 0,
    samplesB: 0,
    medianA: 0.6,
    medianB: 0.72,
    medianDifferenceArcsec: -0.12,
    ci95: [-0.17, -0.07],
    interval: { status: 'ok', nights: 143, reason: null },
    nightlyDifferences: { nights: [], p10: null, p25: null, median: null, p75: null, p90: null },
    wilcoxon: { rankSumPositive: 0, rankSumNegative: 0, statistic: 0, count: 143, zeros: 0, pValue: 0.00001, method: 'normal', z: -4.4 },
    verdict: 'a_sharper',
    reason: null,
    ...fields,
  };
}

describe('the paired verdict in words', () => {
  it('names the sharper site, the margin and its interval, the common nights and the signed-rank p-value', () => {
    expect(describePairedVerdict('Quartz Shoulder', 'Tern Ridge', paired({}))).toBe(
      'Quartz Shoulder is sharper than Tern Ridge by 0.12″ in median seeing (95 % interval 0.07–0.17″, 143 common nights; Wilcoxon signed-rank on nightly medians p < 0.001).',
    );
  });
  it('turns the interval of A − B round when B is the sharper site', () => {
    const text = describePairedVerdict('Tern Ridge', 'Quartz Shoulder', paired({ medianDifferenceArcsec: 0.12, ci95: [0.07, 0.17], verdict: 'b_sharper' }));
    expect(text).toMatch(/^Quartz Shoulder is sharper than Tern Ridge by 0\.12″ in median seeing \(95 % interval 0\.07–0\.17″/);
  });
  it('says "no clear difference" with the signed interval when it includes zero, and calls 10–30 nights approximate', () => {
    const text = describePairedVerdict(
      'Saltpan Crest',
      'Condor Spur',
      paired({ commonNights: 31, medianDifferenceArcsec: 0.01, ci95: [-0.03, 0.05], verdict: 'no_clear_difference', interval: { status: 'ok', nights: 31, reason: null }, wilcoxon: null }),
    );
    expect(text).toBe('No clear difference between Saltpan Crest and Condor Spur on 31 common nights (Saltpan Crest − Condor Spur: −0.03″ to +0.05″, 95 % interval; every nightly difference is zero).');
    const approximate = describePairedVerdict('A', 'B', paired({ commonNights: 12, interval: { status: 'approximate', nights: 12, reason: 'approximate' } }));
    expect(approximate).toContain('(95 % interval, approximate 0.07–0.17″, 12 common nights;');
  });
  it('gives no verdict below 10 common nights, and says so', () => {
    // Site A 1–15 March, B 11–14 March: four common nights (11–14), B 0.2″ worse each night
    const siteA = nightsAt(days(1, 15), () => 0.6);
    const siteB = nightsAt(days(11, 14), () => 0.8);
    const comparison = comparePairedNights(siteA, siteB);
    expect(comparison.commonNights).toBe(4);
    expect(comparison.verdict).toBeNull();
    expect(describePairedVerdict('North', 'South', comparison)).toBe('No paired verdict for North and South: only 4 common nights; at least 10 are needed.');
    const apart = comparePairedNights(siteA, nightsAt([25, 26], () => 0.8));
    expect(describePairedVerdict('North', 'South', apart)).toBe('No common nights: North and South were never measured on the same night, so there is no paired comparison.');
  });
  it('reads a real paired comparison: a constant 0.1″ offset on 15 nights', () => {
    const siteA = nightsAt(days(1, 15), (day) => 0.6 + 0.02 * (day % 3));
    const siteB = { timeMs: siteA.timeMs, seeingArcsec: siteA.seeingArcsec.map((value) => value + 0.1) };
    const comparison = comparePairedNights(siteA, siteB, { bootstrapReplicates: 200 });
    // By hand: 15 differences of −0.1, all tied: normal approximation, variance 15·16·31/24 − (15³ − 15)/48 = 310 − 70 = 240,
    // z = (0 − 60)/√240 = −3.873, p = 2Φ(−3.873) = 1.07e-4 (SciPy's method='approx' gives the same, from memory)
    expect(comparison.wilcoxon?.z).toBeCloseTo(-60 / Math.sqrt(240), 10);
    expect(describePairedVerdict('A', 'B', comparison)).toBe(
      'A is sharper than B by 0.10″ in median seeing (95 % interval, approximate 0.10–0.10″, 15 common nights; Wilcoxon signed-rank on nightly medians p < 0.001).',
    );
    const binned = comparePairedNights(siteA, siteB, { matchedBinMinutes: 10, bootstrapReplicates: 50 });
    expect(describePairedVerdict('A', 'B', binned)).toContain('15 common nights, matched in 10-minute bins;');
  });
  it('writes p-values and signed differences the way a reader expects', () => {
    expect(formatPValue(0.0009)).toBe('p < 0.001');
    expect(formatPValue(0.001)).toBe('p = 0.001');
    expect(formatPValue(0.01234)).toBe('p = 0.012');
    expect(formatPValue(0.5)).toBe('p = 0.5');
    expect(formatSignedArcsec(-0.034)).toBe('−0.03″');
    expect(formatSignedArcsec(0.046)).toBe('+0.05″');
    expect(formatSignedArcsec(-0.001)).toBe('0.00″');
  });
});

describe('the nightly-difference histogram', () => {
  it('puts edges on whole multiples of the width, so zero is an edge', () => {
    expect(differenceHistogram([-0.07, -0.02, 0.01, 0.03])).toEqual([
      { lowArcsec: -0.1, highArcsec: -0.05, count: 1 },
      { lowArcsec: -0.05, highArcsec: 0, count: 1 },
      { lowArcsec: 0, highArcsec: 0.05, count: 2 },
    ]);
  });
  it('closes the last bin on a value at its upper edge and gives one bin for equal values', () => {
    expect(differenceHistogram([0.1, 0.15], { binWidthArcsec: 0.05 })).toEqual([{ lowArcsec: 0.1, highArcsec: 0.15, count: 2 }]);
    expect(differenceHistogram([0.02, 0.02, 0.02])).toEqual([{ lowArcsec: 0, highArcsec: 0.05, count: 3 }]);
    expect(differenceHistogram([])).toEqual([]);
  });
  it('doubles the width until at most 40 bins cover a wide spread', () => {
    // −1″ to +1″ at 0.05″ would be 40 bins, fine; −2″ to +2″ would be 80, so the width becomes 0.1″ (40 bins)
    expect(differenceHistogram([-1, 1])).toHaveLength(40);
    const wide = differenceHistogram([-2, 2]);
    expect(wide).toHaveLength(40);
    expect(wide[0]).toEqual({ lowArcsec: -2, highArcsec: -1.9, count: 1 });
    expect(wide.reduce((sum, bin) => sum + bin.count, 0)).toBe(2);
  });
  it('refuses a difference that is not finite and a width that is not positive', () => {
    expect(() => differenceHistogram([0.1, Number.NaN])).toThrow(/finite arcseconds, got NaN at index 1/);
    expect(() => differenceHistogram([0.1], { binWidthArcsec: 0 })).toThrow(/binWidthArcsec must be a positive number of arcseconds/);
  });
});

describe('the comparison warnings', () => {
  const march = days(1, 20).map((day) => `2025-03-${String(day).padStart(2, '0')}`);
  const site = (name: string, nightLabels: string[], height: number | null = 6, response = 'Tokovinin Z-tilt') => ({ name, nightLabels, monitorHeightsM: [height], responseSets: [response] });

  it('put different heights and response sets beside each row they concern, naming the others', () => {
    const warnings = comparisonWarnings([site('North', march, 6), site('South', march, 2, 'Sarazin & Roddier')]);
    expect(warnings.sites[0]?.map((warning) => warning.code)).toEqual(['different_heights', 'different_response_sets']);
    expect(warnings.sites[0]?.[0]?.message).toBe(
      "North's monitor stands at 6 m above ground, South's at 2 m: seeing improves with height above ground, so part of the difference is the mast, not the site.",
    );
    expect(warnings.sites[1]?.[1]?.message).toBe("South's response coefficients (Sarazin & Roddier) differ from North's (Tokovinin Z-tilt): the choice alone moves seeing by 7–10 %.");
    expect(comparisonWarnings([site('North', march), site('South', march)]).sites).toEqual([[], []]);
  });
  it('name thinly covered months and too few nights', () => {
    const nights = [...march, '2025-04-02', '2025-04-03', '2025-05-09'];
    const warnings = comparisonWarnings([site('North', nights), site('Short', ['2025-03-01', '2025-03-02'])]);
    expect(warnings.sites[0]).toEqual([
      { code: 'thin_months', message: 'North: April 2025 (2 nights), May 2025 (1 night) are thinly covered (fewer than 5 nights); those months\' figures rest on a few nights.' },
    ]);
    expect(warnings.sites[1]?.map((warning) => warning.code)).toEqual(['thin_months', 'too_few_nights']);
    expect(warnings.sites[1]?.[1]?.message).toBe('Short: too few nights for an interval (2 nights); at least 10 are needed, so no interval is shown.');
  });
  it('warn about a pair that shares fewer than three months, and not about one that shares three', () => {
    const spring = ['2025-03-05', '2025-04-05', '2025-05-05'];
    const warnings = comparisonWarnings([site('A', spring), site('B', ['2025-05-06', '2025-06-01', '2025-07-01']), site('C', ['2025-03-09', '2025-04-09', '2025-05-09'])]);
    expect(warnings.pairs.map((pair) => [pair.a, pair.b, pair.warnings.map((warning) => warning.code)])).toEqual([
      [0, 1, ['few_overlap_months']],
      [0, 2, []],
      [1, 2, ['few_overlap_months']],
    ]);
    expect(warnings.pairs[0]?.warnings[0]?.message).toMatch(/^A and B share only 1 month with nights at both \(fewer than 3\): their unpaired difference mixes seasons/);
  });
  it('say when the filters are not the standard ones', () => {
    expect(comparisonWarnings([], { maxZenithDeg: 60, sunMaxDeg: -18, minFlux: null }).general).toEqual([]);
    expect(comparisonWarnings([], { maxZenithDeg: 45, sunMaxDeg: -18, minFlux: 500 }).general[0]?.message).toBe(
      'The filters differ from the standard ones (zenith limit 45° instead of 60°; flux minimum 500 instead of none): these figures are not comparable with figures made with the standard filters.',
    );
    expect(comparisonWarnings([], { maxZenithDeg: 60, sunMaxDeg: -18, minFlux: null, leaveOutAnisotropic: false }).general[0]?.message).toMatch(/\(anisotropic samples kept instead of left out\)/);
    expect(() => comparisonWarnings([site('Bad', ['March 1'])])).toThrow(/nightLabels must be 'YYYY-MM-DD' dates, got 'March 1' for Bad/);
  });
});
