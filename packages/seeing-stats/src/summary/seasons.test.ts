import { describe, expect, it } from 'vitest';
import { hemisphereSeasons, seasonIndexOfMonth } from './hemisphereSeasons.js';
import { createRandom } from '../stats/random.js';
import { weightedMedianSorted } from '../stats/weightedMedian.js';
import { seasonBalancedMedian, seasonBalancedMedianSorted } from './seasonBalancedMedian.js';
import { summarizeSeeing, type SampleColumns } from './summarizeSeeing.js';
import { summarizeTurbulenceParameter } from './summarizeTurbulenceParameter.js';

/** Samples at 22:00 UTC + minutes on the given evenings (longitude 0: the night is that date). */
function log(entries: [string, number[]][]): SampleColumns {
  const times: number[] = [];
  const seeing: number[] = [];
  for (const [date, values] of entries) {
    values.forEach((value, index) => {
      times.push(Date.parse(`${date}T22:00:00Z`) + index * 60_000);
      seeing.push(value);
    });
  }
  return { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
}

// An unequal month mix: six January samples (three nights), one June sample, two March samples.
const unequalMonths = log([
  ['2025-01-10', [0.5, 0.55]],
  ['2025-01-11', [0.6, 0.65]],
  ['2025-01-12', [0.7, 0.75]],
  ['2025-03-05', [1.0, 1.1]],
  ['2025-06-20', [0.9]],
]);

describe('seasonBalancedMedian', () => {
  it('weighs each covered calendar month the same and differs from the pooled median by the amount worked by hand', () => {
    // By hand: sorted 0.50 0.55 0.60 0.65 0.70 0.75 (January, weight 1/6 each) 0.90 (June, weight 1) 1.00 1.10
    // (March, 1/2 each); the total weight is 3 (three months), half is 1.5; the running weight is 1 after 0.75 and
    // 2 after 0.90, so the season-balanced median is 0.90″. The pooled median of the nine samples is the 5th, 0.70″
    // (numpy.median gives 0.7). Difference 0.20″.
    const balanced = seasonBalancedMedian(unequalMonths, { longitudeDeg: 0 });
    expect(balanced?.medianArcsec).toBeCloseTo(0.9, 12);
    const summary = summarizeSeeing(unequalMonths, { longitudeDeg: 0 });
    expect(summary?.seeing.median).toBeCloseTo(0.7, 12);
    expect((summary?.seasonBalanced.medianArcsec ?? 0) - (summary?.seeing.median ?? 0)).toBeCloseTo(0.2, 12);
    expect(summary?.seasonBalanced).toEqual(balanced);
  });
  it('names the calendar months without samples and counts the covered ones over all years', () => {
    const balanced = seasonBalancedMedian(unequalMonths, { longitudeDeg: 0 });
    expect(balanced?.monthsCovered).toEqual([{ month: 1, samples: 6 }, { month: 3, samples: 2 }, { month: 6, samples: 1 }]);
    expect(balanced?.monthsMissing).toEqual(['February', 'April', 'May', 'July', 'August', 'September', 'October', 'November', 'December']);
    // January of two years is one calendar month
    const twoYears = seasonBalancedMedian(log([['2025-01-10', [0.5]], ['2026-01-10', [0.7]], ['2025-02-10', [1.5]]]));
    expect(twoYears?.monthsCovered).toEqual([{ month: 1, samples: 2 }, { month: 2, samples: 1 }]);
    // by hand: weights 1/2, 1/2 (January), 1 (February); half of 2 is reached exactly at 0.7, so (0.7 + 1.5) / 2 = 1.1
    expect(twoYears?.medianArcsec).toBeCloseTo(1.1, 12);
  });
  it('equals the pooled median when every month has the same number of samples', () => {
    const even = log([['2025-01-10', [0.5, 0.9]], ['2025-02-10', [0.6, 1.2]], ['2025-03-10', [0.7, 0.8]]]);
    expect(seasonBalancedMedian(even)?.medianArcsec).toBeCloseTo(summarizeSeeing(even)?.seeing.median ?? 0, 12);
    expect(seasonBalancedMedian({ timeMs: new Float64Array(0), seeingArcsec: new Float64Array(0) })).toBeNull();
  });
});

describe('seasons', () => {
  it('are the meteorological DJF, MAM, JJA, SON named for the hemisphere', () => {
    // common practice (climatology): December goes with January and February
    expect([12, 1, 2, 3, 5, 6, 8, 9, 11].map(seasonIndexOfMonth)).toEqual([0, 0, 0, 1, 1, 2, 2, 3, 3]);
    expect(hemisphereSeasons(-24.6).map((season) => season.name)).toEqual(['summer', 'autumn', 'winter', 'spring']);
    expect(hemisphereSeasons(19.8).map((season) => season.name)).toEqual(['winter', 'spring', 'summer', 'autumn']);
    expect(hemisphereSeasons().map((season) => season.name)).toEqual([null, null, null, null]);
    expect(() => hemisphereSeasons(95)).toThrow(/latitudeDeg must be degrees in \[-90, 90\], got 95/);
  });
  it('give samples, nights and percentiles per season in a summary', () => {
    const summary = summarizeSeeing(unequalMonths, { longitudeDeg: 0, latitudeDeg: -30 });
    const seasons = summary?.seasons ?? [];
    expect(seasons.map((season) => [season.code, season.name, season.samples, season.nights])).toEqual([
      ['DJF', 'summer', 6, 3],
      ['MAM', 'autumn', 2, 1],
      ['JJA', 'winter', 1, 1],
      ['SON', 'spring', 0, 0],
    ]);
    // numpy.percentile([0.5, 0.55, 0.6, 0.65, 0.7, 0.75], [25, 50, 75]) → 0.5625, 0.625, 0.6875
    expect(seasons[0]?.median).toBeCloseTo(0.625, 12);
    expect(seasons[0]?.p25).toBeCloseTo(0.5625, 12);
    expect(seasons[0]?.p75).toBeCloseTo(0.6875, 12);
    expect(seasons[1]?.median).toBeCloseTo(1.05, 12);
    expect(seasons[3]?.median).toBeNull();
  });
});

describe('statistics of nightly medians', () => {
  it('give the median and quartiles over nights, each night once', () => {
    // nightly medians 0.525, 0.625, 0.725, 1.05, 0.90; numpy.percentile(…, [25, 50, 75]) → 0.625, 0.725, 0.9
    const summary = summarizeSeeing(unequalMonths, { longitudeDeg: 0 });
    expect(summary?.nightlyMedians.nights).toBe(5);
    expect(summary?.nightlyMedians.median).toBeCloseTo(0.725, 12);
    expect(summary?.nightlyMedians.p25).toBeCloseTo(0.625, 12);
    expect(summary?.nightlyMedians.p75).toBeCloseTo(0.9, 12);
  });
});

describe('τ0 and θ0 summaries', () => {
  it('give percentiles, months and seasons of the samples that carry a value', () => {
    const timeMs = unequalMonths.timeMs;
    const tau0Ms = Float64Array.from([4, 5, 6, Number.NaN, 7, 8, 3, 2, Number.NaN]);
    const result = summarizeTurbulenceParameter(timeMs, tau0Ms, { longitudeDeg: 0, latitudeDeg: 20 });
    expect(result?.samples).toBe(7);
    // numpy.percentile([4, 5, 6, 7, 8, 3, 2], [10, 25, 50, 75, 90]) → 2.6, 3.5, 5, 6.5, 7.4
    expect([result?.p10, result?.p25, result?.median, result?.p75, result?.p90].map((value) => Number(value?.toFixed(10)))).toEqual([2.6, 3.5, 5, 6.5, 7.4]);
    expect(result?.monthly.map((month) => [month.month, month.samples, month.median])).toEqual([['2025-01', 5, 6], ['2025-03', 2, 2.5]]);
    expect(result?.seasons.map((season) => [season.code, season.name, season.samples])).toEqual([['DJF', 'winter', 5], ['MAM', 'spring', 2], ['JJA', 'summer', 0], ['SON', 'autumn', 0]]);
    expect(summarizeTurbulenceParameter(timeMs, new Float64Array(timeMs.length).fill(Number.NaN))).toBeNull();
    expect(() => summarizeTurbulenceParameter(timeMs, new Float64Array(timeMs.length).fill(-1))).toThrow(/positive finite numbers or NaN/);
  });
  it('ride along in the seeing summary when the columns carry them', () => {
    const theta0Arcsec = new Float64Array(unequalMonths.timeMs.length).fill(2.1);
    const summary = summarizeSeeing({ ...unequalMonths, theta0Arcsec }, { longitudeDeg: 0 });
    expect(summary?.theta0?.unit).toBe('arcsec');
    expect(summary?.theta0?.median).toBe(2.1);
    expect(summary?.tau0).toBeNull();
    expect(() => summarizeSeeing({ ...unequalMonths, tau0Ms: new Float64Array(2) })).toThrow(/tau0Ms must have one value per sample/);
  });
});

describe('seasonBalancedMedianSorted against weightedMedianSorted', () => {
  it('gives exactly the weighted median with weight 1 / (samples in the month), ties between two values included', () => {
    const random = createRandom(11);
    for (let trial = 0; trial < 200; trial += 1) {
      const count = 1 + Math.floor(random() * 60);
      // Few distinct values and months, so the running weight often lands on half exactly.
      const sorted = Float64Array.from({ length: count }, () => 0.4 + Math.floor(random() * 8) / 10).sort();
      const months = Int32Array.from({ length: count }, () => 1 + Math.floor(random() * (trial % 2 === 0 ? 2 : 12)));
      const perMonth = new Int32Array(13);
      months.forEach((month) => (perMonth[month] = (perMonth[month] ?? 0) + 1));
      const weights = Float64Array.from(months, (month) => 1 / (perMonth[month] ?? 1));
      const covered = perMonth.filter((samples) => samples > 0).length;
      expect(seasonBalancedMedianSorted(sorted, months).medianArcsec).toBe(weightedMedianSorted(sorted, weights, covered));
    }
  });
});
