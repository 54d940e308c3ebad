import { describe, expect, it } from 'vitest';
import { sortPositive } from '../stats/argsortPositive.js';
import { createRandom, normalDeviate } from '../stats/random.js';
import { briefSeeing } from './briefSeeing.js';
import { summarizeSeeingPresorted } from './summarizeSeeing.js';

describe('briefSeeing', () => {
  it('gives exactly the samples, nights, median and quartiles of the full summary, also for pooled campaigns out of time order', () => {
    const random = createRandom(7);
    const times: number[] = [];
    const seeing: number[] = [];
    // Two invented campaigns pooled one after the other, the second overlapping the first in time (so times are not in order).
    for (const [firstDay, nights] of [[0, 40], [25, 30]] as const) {
      for (let night = 0; night < nights; night += 1) {
        const level = 0.8 * Math.exp(0.3 * normalDeviate(random));
        for (let step = 0; step < 50; step += 1) {
          times.push(Date.UTC(2024, 4, 1 + firstDay + night, 23) + step * 7 * 60_000 + (firstDay > 0 ? 30_000 : 0));
          seeing.push(level * Math.exp(0.1 * normalDeviate(random)));
        }
      }
    }
    const columns = { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
    const presorted = sortPositive(columns.seeingArcsec);
    const full = summarizeSeeingPresorted(columns, presorted, { longitudeDeg: -70.3, bootstrapReplicates: 10 });
    const brief = briefSeeing(columns, presorted, { longitudeDeg: -70.3 });
    // 40 nights, then 30 of which the first 15 are nights the first campaign had: 55 distinct nights
    expect(brief?.nights).toBe(55);
    expect(brief).toEqual({ samples: columns.seeingArcsec.length, nights: full?.nights, p25: full?.seeing.p25, median: full?.seeing.median, p75: full?.seeing.p75 });
    expect(briefSeeing({ timeMs: new Float64Array(0), seeingArcsec: new Float64Array(0) }, { sorted: new Float64Array(0) })).toBeNull();
    expect(() => briefSeeing({ timeMs: new Float64Array(1), seeingArcsec: new Float64Array(2) }, presorted)).toThrow(/equal length/);
  });
});
