import { describe, expect, it } from 'vitest';
import { comparePairedNights } from './comparePairedNights.js';
import { pairNights } from './pairNights.js';
import type { SampleColumns } from './summarizeSeeing.js';

const HOUR_MS = 3_600_000;

/**
 * A hand-built log: on each listed evening, samples every 10 minutes from local 21:00 for `count` samples, at
 * level + the offsets below (so the nightly median is level + 0.02 for four samples: offsets 0, 0.01, 0.03, 0.05).
 */
function site(longitudeDeg: number, nights: { date: string; level: number }[], count = 4, startLocalHour = 21): SampleColumns {
  const offsets = [0, 0.01, 0.03, 0.05, 0.02, 0.04];
  const times: number[] = [];
  const seeing: number[] = [];
  for (const { date, level } of nights) {
    const startMs = Date.parse(`${date}T00:00:00Z`) + startLocalHour * HOUR_MS - (longitudeDeg / 15) * HOUR_MS;
    for (let step = 0; step < count; step += 1) {
      times.push(startMs + step * 10 * 60_000);
      seeing.push(level + (offsets[step % offsets.length] ?? 0));
    }
  }
  return { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
}

const march = (day: number): string => `2025-03-${String(day).padStart(2, '0')}`;
const range = (first: number, last: number): number[] => Array.from({ length: last - first + 1 }, (_, index) => first + index);

// Site A at 0° (nights 1–15 March), site B at 70° W (nights 6–25 March): common nights 6–15 March, ten of them.
// On common night k (k = 0..9) B's level is A's + 0.05 (k + 1): the nightly differences A − B are −0.05 … −0.50″.
const levelA = (day: number): number => 0.6 + 0.02 * (day % 4);
const siteA = site(0, range(1, 15).map((day) => ({ date: march(day), level: levelA(day) })));
const siteB = site(-70, range(6, 25).map((day) => ({ date: march(day), level: (day <= 15 ? levelA(day) + 0.05 * (day - 5) : 0.9) })));

describe('pairNights', () => {
  it('finds the common nights, each site with its own longitude, and the known nightly differences', () => {
    const pairing = pairNights(siteA, siteB, { longitudeDegA: 0, longitudeDegB: -70 });
    expect(pairing.nights.map((night) => night.night)).toEqual(range(6, 15).map(march));
    pairing.nights.forEach((night, index) => {
      // by construction (see above): nightly median = level + 0.02 at both sites
      expect(night.medianA).toBeCloseTo(levelA(6 + index) + 0.02, 12);
      expect(night.differenceArcsec).toBeCloseTo(-0.05 * (index + 1), 12);
      expect([night.samplesA, night.samplesB]).toEqual([4, 4]);
    });
    expect(pairing.groupedA.values.length).toBe(40);
    expect(pairing.matching).toBe('nights');
  });
  it('without B\'s longitude names B\'s nights in UTC, which moves them', () => {
    // B's local 21:00 at 70° W is 01:40 UTC the next day: before 12:00 UTC, so still the same evening's night
    const pairing = pairNights(siteA, siteB, { longitudeDegA: 0 });
    expect(pairing.nights.map((night) => night.night)).toEqual(range(6, 15).map(march));
  });
  it('matches in 10-minute bins: only the hours both monitors ran', () => {
    // A runs 21:00–21:50 UTC (six samples), B at 0° from 21:30 (six samples): common bins 21:30, 21:40, 21:50
    const early = site(0, [{ date: march(1), level: 0.7 }], 6, 21);
    const late = site(0, [{ date: march(1), level: 0.9 }], 6, 21.5);
    const pairing = pairNights(early, late, { matchedBinMinutes: 10 });
    expect(pairing.matching).toBe('bins');
    expect(pairing.nights).toHaveLength(1);
    expect([pairing.nights[0]?.samplesA, pairing.nights[0]?.samplesB]).toEqual([3, 3]);
    // A's last three samples are 0.7 + 0.05, 0.02, 0.04 → median 0.74; B's first three 0.9 + 0, 0.01, 0.03 → median 0.91
    expect(pairing.nights[0]?.medianA).toBeCloseTo(0.74, 12);
    expect(pairing.nights[0]?.medianB).toBeCloseTo(0.91, 12);
    expect(() => pairNights(early, late, { matchedBinMinutes: 0 })).toThrow(/matchedBinMinutes must be a positive number of minutes/);
  });
});

describe('comparePairedNights', () => {
  it('gives the paired difference, its joint night-bootstrap interval, the signed-rank test and a verdict', () => {
    const comparison = comparePairedNights(siteA, siteB, { longitudeDegA: 0, longitudeDegB: -70, bootstrapReplicates: 500 });
    expect(comparison.commonNights).toBe(10);
    expect(comparison.interval.status).toBe('approximate');
    expect(comparison.nightlyDifferences.median).toBeCloseTo(-0.275, 12); // by hand: mean of −0.25 and −0.30
    // SciPy 1.17.1: scipy.stats.wilcoxon([-0.05, -0.10, …, -0.50]) → statistic 0.0, pvalue 0.001953125 (= 2 / 2^10)
    expect(comparison.wilcoxon?.statistic).toBe(0);
    expect(comparison.wilcoxon?.pValue).toBeCloseTo(0.001953125, 12);
    const [low, high] = comparison.ci95 ?? [0, 0];
    expect(high).toBeLessThan(0);
    expect(low).toBeLessThan(high);
    expect(comparison.medianDifferenceArcsec).toBeLessThan(0);
    expect(comparison.verdict).toBe('a_sharper');
    expect(comparison.reason).toBeNull();
  });
  it('resamples the same nights for both sites: a constant offset gives an interval of zero width', () => {
    // B = A + 0.1″ sample by sample. Independent resampling would give a wide interval; the joint one cannot.
    const shifted = { timeMs: siteA.timeMs, seeingArcsec: siteA.seeingArcsec.map((value) => value + 0.1) };
    const comparison = comparePairedNights(siteA, shifted, { longitudeDegA: 0, longitudeDegB: 0 });
    expect(comparison.ci95?.[0]).toBeCloseTo(-0.1, 12);
    expect(comparison.ci95?.[1]).toBeCloseTo(-0.1, 12);
    expect(comparison.verdict).toBe('a_sharper');
  });
  it('finds no clear difference between a site and itself', () => {
    const comparison = comparePairedNights(siteB, siteB, { longitudeDegA: -70, longitudeDegB: -70 });
    expect(comparison.commonNights).toBe(20);
    expect(comparison.ci95).toEqual([0, 0]);
    expect(comparison.wilcoxon).toBeNull(); // every difference is 0
    expect(comparison.verdict).toBe('no_clear_difference');
  });
  it('gives no verdict, interval or test below 10 common nights, but still the nightly differences', () => {
    const shortB = site(-70, range(8, 12).map((day) => ({ date: march(day), level: 0.9 })));
    const comparison = comparePairedNights(siteA, shortB, { longitudeDegA: 0, longitudeDegB: -70 });
    expect(comparison.commonNights).toBe(5);
    expect(comparison.verdict).toBeNull();
    expect(comparison.ci95).toBeNull();
    expect(comparison.wilcoxon).toBeNull();
    expect(comparison.reason).toBe('fewer than 10 common nights (5): no paired verdict');
    expect(comparison.nightlyDifferences.nights).toHaveLength(5);
    const none = comparePairedNights(siteA, site(0, [{ date: '2025-07-01', level: 0.8 }]));
    expect(none.commonNights).toBe(0);
    expect(none.medianDifferenceArcsec).toBeNull();
    expect(none.nightlyDifferences.median).toBeNull();
  });
});
