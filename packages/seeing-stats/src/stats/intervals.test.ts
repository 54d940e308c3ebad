import { describe, expect, it } from 'vitest';
import { bootstrapGroupFraction } from './bootstrapGroupFraction.js';
import { nightIntervalStatus } from './nightIntervalStatus.js';
import { simulateIntervalCoverage } from './simulateIntervalCoverage.js';

describe('nightIntervalStatus', () => {
  it('gives no interval below 10 nights, an approximate one from 10 to 30 and a plain one above', () => {
    expect(nightIntervalStatus(0).status).toBe('too_few_nights');
    expect(nightIntervalStatus(9)).toEqual({ status: 'too_few_nights', nights: 9, reason: 'too few nights for an interval (9 nights)' });
    expect(nightIntervalStatus(10).status).toBe('approximate');
    expect(nightIntervalStatus(30).status).toBe('approximate');
    expect(nightIntervalStatus(31)).toEqual({ status: 'ok', nights: 31, reason: null });
  });
});

describe('bootstrapGroupFraction', () => {
  it('gives the pooled fraction of the drawn groups, reproducibly', () => {
    const hits = Int32Array.of(3, 0, 1);
    const sizes = Int32Array.of(4, 2, 4);
    const first = bootstrapGroupFraction(hits, sizes, { replicates: 500, seed: 4 });
    expect(first).toEqual(bootstrapGroupFraction(hits, sizes, { replicates: 500, seed: 4 }));
    // every replicate is Σ hits / Σ sizes of three drawn groups: a ratio of whole numbers with a denominator ≤ 12
    for (const fraction of first) expect([...Array(13).keys()].some((denominator) => denominator > 0 && Math.abs(fraction * denominator - Math.round(fraction * denominator)) < 1e-12)).toBe(true);
    // drawing every group once gives 4/10; the mean over replicates is near the ratio estimate (by hand: 0.4)
    const mean = first.reduce((sum, fraction) => sum + fraction, 0) / first.length;
    expect(mean).toBeGreaterThan(0.33);
    expect(mean).toBeLessThan(0.47);
  });
  it('refuses hit counts above the group size', () => {
    expect(() => bootstrapGroupFraction(Int32Array.of(5), Int32Array.of(4), { replicates: 1, seed: 1 })).toThrow(/between 0 and the group size 4/);
  });
});

describe('simulateIntervalCoverage', () => {
  it('measures the nominal 95 % whole-night interval covering the truth never on 1 night and too rarely on 3', () => {
    // Seeded small run of the simulation the README quotes (bench/intervalCoverage.ts runs it large).
    const results = simulateIntervalCoverage({ nightCounts: [1, 3, 10, 30], trials: 200, samplesPerNight: 30, replicates: 200, seed: 7 });
    const coverage = Object.fromEntries(results.map((result) => [result.nights, result.coverage]));
    // one night: every replicate is that night, so the interval is the night's own median and misses the truth
    expect(coverage[1]).toBe(0);
    // three nights: well below 95 % (about 70–75 %; binomial spread over 200 trials is about ±3 %)
    expect(coverage[3]).toBeLessThan(0.82);
    expect(coverage[3]).toBeGreaterThan(0.6);
    // ten and thirty nights: close to nominal
    expect(coverage[10]).toBeGreaterThan(0.86);
    expect(coverage[30]).toBeGreaterThan(0.9);
    expect(results.every((result) => result.trials === 200)).toBe(true);
  });
});
