import { describe, expect, it } from 'vitest';
import { sortPositive } from '../stats/argsortPositive.js';
import { createRandom, normalDeviate } from '../stats/random.js';
import { comparePairedNights } from '../summary/comparePairedNights.js';
import { compareSeeing } from '../summary/compareSeeing.js';
import type { SampleColumns } from '../summary/summarizeSeeing.js';
import { comparePreparedPaired, comparePreparedUnpaired, prepareSite } from './preparedComparison.js';

const MINUTE_MS = 60_000;

/**
 * A seeded invented monitor: `nights` evenings from 2025-03-01 with a random share lost to weather, samples every
 * `stepMinutes` from a random start between local 20:00 and 23:00, night level log-normal; values rounded to 0.01″
 * so equal values occur across nights (the stable sort must not change any result).
 */
function monitor(seed: number, nights: number, longitudeDeg: number, stepMinutes: number): SampleColumns {
  const random = createRandom(seed);
  const times: number[] = [];
  const seeing: number[] = [];
  for (let night = 0; night < nights; night += 1) {
    if (random() < 0.25) continue;
    const level = 0.8 * Math.exp(0.3 * normalDeviate(random));
    const startMs = Date.UTC(2025, 2, 1 + night, 20) + Math.floor(random() * 180) * MINUTE_MS - (longitudeDeg / 15) * 3_600_000;
    const count = 5 + Math.floor(random() * 40);
    for (let step = 0; step < count; step += 1) {
      times.push(startMs + step * stepMinutes * MINUTE_MS);
      seeing.push(Math.round(100 * level * Math.exp(0.15 * normalDeviate(random))) / 100);
    }
  }
  return { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
}

const prepared = (columns: SampleColumns, longitudeDeg: number) => prepareSite(columns, sortPositive(columns.seeingArcsec), { longitudeDeg });

describe('comparisons on prepared sites', () => {
  const siteA = monitor(7, 60, -68.4, 3);
  const siteB = monitor(8, 50, -68.9, 4);
  const options = { longitudeDegA: -68.4, longitudeDegB: -68.9, bootstrapReplicates: 300, seed: 5 };

  it('give exactly what comparePairedNights gives, night by night', () => {
    const reference = comparePairedNights(siteA, siteB, options);
    expect(reference.commonNights).toBeGreaterThan(20);
    expect(comparePreparedPaired(prepared(siteA, -68.4), prepared(siteB, -68.9), { bootstrapReplicates: 300, seed: 5 })).toEqual(reference);
  });
  it('give exactly what comparePairedNights gives with 10-minute bins, nights losing every sample at one site included', () => {
    const reference = comparePairedNights(siteA, siteB, { ...options, matchedBinMinutes: 10 });
    const plain = comparePairedNights(siteA, siteB, options);
    // bin matching drops nights whose hours do not overlap (start times are random), so this case is exercised
    expect(reference.commonNights).toBeLessThan(plain.commonNights);
    expect(comparePreparedPaired(prepared(siteA, -68.4), prepared(siteB, -68.9), { matchedBinMinutes: 10, bootstrapReplicates: 300, seed: 5 })).toEqual(reference);
  });
  it('match in bins correctly for a site pooled from two campaigns whose runs are not in time order', () => {
    // Two runs, the second earlier than the first (as a site row concatenates its campaigns' columns)
    const late = monitor(11, 30, -68.4, 3);
    const early = { timeMs: late.timeMs.map((time) => time - 20 * 86_400_000), seeingArcsec: monitor(12, 30, -68.4, 3).seeingArcsec.slice(0, late.timeMs.length) };
    const pooled = {
      timeMs: Float64Array.from([...late.timeMs, ...early.timeMs.slice(0, early.seeingArcsec.length)]),
      seeingArcsec: Float64Array.from([...late.seeingArcsec, ...early.seeingArcsec]),
    };
    const reference = comparePairedNights(pooled, siteB, { ...options, matchedBinMinutes: 10 });
    expect(reference.commonNights).toBeGreaterThan(10);
    expect(comparePreparedPaired(prepared(pooled, -68.4), prepared(siteB, -68.9), { matchedBinMinutes: 10, bootstrapReplicates: 300, seed: 5 })).toEqual(reference);
  });
  it('give exactly what compareSeeing gives, and the same again from the replicates kept for the next pair', () => {
    const reference = compareSeeing(siteA, siteB, options);
    const preparedA = prepared(siteA, -68.4);
    const preparedB = prepared(siteB, -68.9);
    expect(comparePreparedUnpaired(preparedA, preparedB, { bootstrapReplicates: 300, seed: 5 })).toEqual(reference);
    expect(comparePreparedUnpaired(preparedA, preparedB, { bootstrapReplicates: 300, seed: 5 })).toEqual(reference);
    expect(preparedA.replicatesBySeed.size).toBe(1);
  });
  it('give no verdict below 10 common nights and refuse an empty site for the unpaired figures', () => {
    const short = monitor(9, 8, -68.9, 4);
    const paired = comparePreparedPaired(prepared(siteA, -68.4), prepared(short, -68.9));
    expect(paired).toEqual(comparePairedNights(siteA, short, { longitudeDegA: -68.4, longitudeDegB: -68.9 }));
    expect(paired.verdict).toBeNull();
    const empty = { timeMs: new Float64Array(0), seeingArcsec: new Float64Array(0) };
    expect(() => comparePreparedUnpaired(prepared(siteA, -68.4), prepared(empty, 0))).toThrow(/needs samples at both sites, got \d+ and 0/);
    expect(() => prepareSite(siteA, sortPositive(siteB.seeingArcsec))).toThrow(/presorted must sort all/);
  });
});
