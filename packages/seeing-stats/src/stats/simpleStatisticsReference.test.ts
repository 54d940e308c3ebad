import { describe, expect, it } from 'vitest';
import { mean, median, quantile, standardDeviation, wilcoxonRankSum } from 'simple-statistics';
import { fitLogNormal } from './fitLogNormal.js';
import { mannWhitney } from './mannWhitney.js';
import { percentile, percentileSorted } from './percentile.js';
import { createRandom, normalDeviate } from './random.js';

// The engine's percentiles, medians, log-normal fit and rank test held against simple-statistics (an outside
// library, used here as the reference only): its quantile is the linear Hyndman-Fan type 7 the engine documents,
// its standardDeviation the population one (the log-normal maximum-likelihood sigma), and wilcoxonRankSum the
// rank sum with average ranks for ties that Mann-Whitney's U is built from.

/** Invented seeing-like values: log-normal around 0.8 arcsec, rounded to 0.01 so ties occur. */
function seeingValues(seed: number, count: number): number[] {
  const random = createRandom(seed);
  return Array.from({ length: count }, () => Math.round(0.8 * Math.exp(0.35 * normalDeviate(random)) * 100) / 100);
}

describe('against simple-statistics', () => {
  it('percentiles and medians agree for odd, even and tiny samples', () => {
    for (const [seed, count] of [
      [1, 1],
      [2, 2],
      [3, 7],
      [4, 100],
      [5, 1001],
    ] as const) {
      const values = seeingValues(seed, count);
      const sorted = [...values].sort((left, right) => left - right);
      for (const fraction of [0, 0.1, 0.25, 0.5, 0.75, 0.9, 1]) {
        expect(percentile(values, fraction)).toBeCloseTo(quantile(values, fraction), 12);
        expect(percentileSorted(sorted, fraction)).toBeCloseTo(quantile(values, fraction), 12);
      }
      expect(percentile(values, 0.5)).toBeCloseTo(median(values), 12);
    }
  });

  it('the log-normal fit is the mean and population standard deviation of the logarithms', () => {
    const values = seeingValues(6, 500);
    const logs = values.map((value) => Math.log(value));
    const fit = fitLogNormal(values);
    expect(fit.mu).toBeCloseTo(mean(logs), 12);
    expect(fit.sigma).toBeCloseTo(standardDeviation(logs), 12);
  });

  it("Mann-Whitney's U is the first sample's rank sum less nA (nA + 1) / 2, ties included", () => {
    const sampleA = seeingValues(7, 60);
    const sampleB = seeingValues(8, 45).map((value) => Math.round(value * 1.1 * 100) / 100);
    const { u, countA } = mannWhitney(sampleA, sampleB);
    expect(u).toBeCloseTo(wilcoxonRankSum(sampleA, sampleB) - (countA * (countA + 1)) / 2, 9);
  });
});
