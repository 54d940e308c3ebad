import { describe, expect, it } from 'vitest';
// @ts-expect-error jstat ships no type declarations; used only as an outside reference in tests
import jStatModule from 'jstat';
import kstest from '@stdlib/stats-kstest';
import stdlibNormalCdf from '@stdlib/stats-base-dists-normal-cdf';
import { argsortPositive, argsortPositiveByRadix, sortPositive } from './argsortPositive.js';
import { bootstrapPooledMedian, bootstrapPooledMedianPairSorted, bootstrapPooledMedianSorted, sortWithGroups } from './bootstrapPooledMedian.js';
import { fitLogNormal, fitLogNormalToLogs, naturalLogs } from './fitLogNormal.js';
import { ksDistanceLogNormal, ksDistanceLogNormalOfLogs } from './ksDistanceLogNormal.js';
import { mannWhitney } from './mannWhitney.js';
import { normalCdf } from './normalCdf.js';
import { percentile, percentileSorted } from './percentile.js';
import { createRandom, normalDeviate, RandomStream } from './random.js';

interface JStatReference {
  percentile(values: number[], fraction: number): number;
  mean(values: number[]): number;
  stdev(values: number[], sample?: boolean): number;
}
const jStat = (jStatModule as { jStat: JStatReference }).jStat;

function logNormalSample(count: number, seed: number, medianArcsec = 0.7, sigma = 0.35): number[] {
  const random = createRandom(seed);
  return Array.from({ length: count }, () => medianArcsec * Math.exp(sigma * normalDeviate(random)));
}

describe('percentiles', () => {
  it('match the numpy "linear" values of the reference data set', () => {
    // seeing-physics.md §9 #21 (numpy.percentile, default method = Hyndman & Fan type 7)
    const data = [0.45, 0.52, 0.58, 0.61, 0.66, 0.7, 0.74, 0.81, 0.93, 1.2];
    const expected = [0.513, 0.5875, 0.68, 0.7925, 0.957];
    [0.1, 0.25, 0.5, 0.75, 0.9].forEach((fraction, index) => expect(percentile(data, fraction)).toBeCloseTo(expected[index] ?? 0, 12));
  });
  it('agree with jstat on generated data', () => {
    const data = logNormalSample(5001, 3);
    for (const fraction of [0.01, 0.1, 0.25, 0.5, 0.75, 0.9]) {
      // checked against jstat's percentile (inclusive, = type 7)
      expect(percentile(data, fraction)).toBeCloseTo(jStat.percentile(data, fraction), 12);
    }
  });
  it('handle one value, the ends, and refuse empty input', () => {
    expect(percentileSorted([0.8], 0.9)).toBe(0.8);
    expect(percentileSorted([1, 2, 3], 0)).toBe(1);
    expect(percentileSorted([1, 2, 3], 1)).toBe(3);
    expect(() => percentileSorted([], 0.5)).toThrow(/at least one value/);
    expect(() => percentileSorted([1], 1.5)).toThrow(/fraction/);
  });
});

describe('log-normal fit and KS distance', () => {
  it('fits the reference data set to μ = −0.3666, σ = 0.2713', () => {
    // seeing-physics.md §9 #21 (numpy, ddof 0)
    const fit = fitLogNormal([0.45, 0.52, 0.58, 0.61, 0.66, 0.7, 0.74, 0.81, 0.93, 1.2]);
    expect(fit.mu).toBeCloseTo(-0.3665723308921741, 12);
    expect(fit.sigma).toBeCloseTo(0.271290169861505, 12);
    expect(fit.median).toBeCloseTo(0.6931, 4);
  });
  it('agrees with jstat mean and population standard deviation of ln x on generated data', () => {
    const data = logNormalSample(20000, 4);
    const logs = data.map(Math.log);
    const fit = fitLogNormal(data);
    expect(fit.mu).toBeCloseTo(jStat.mean(logs), 12);
    expect(fit.sigma).toBeCloseTo(jStat.stdev(logs, false), 12);
  });
  it('gives the same KS distance as @stdlib/stats-kstest', () => {
    const data = logNormalSample(3000, 5, 0.8, 0.3);
    const fit = fitLogNormal(data);
    const sorted = Float64Array.from(data).sort();
    const reference = kstest(data, 'lognormal', fit.mu, fit.sigma).statistic;
    // our normal CDF is good to ~1e-7, so the distances agree to that
    expect(Math.abs(ksDistanceLogNormal(sorted, fit.mu, fit.sigma) - reference)).toBeLessThan(1e-6);
  });
  it('finds a large KS distance for data that are not log-normal', () => {
    const bimodal = [...logNormalSample(1000, 6, 0.5, 0.05), ...logNormalSample(1000, 7, 1.5, 0.05)];
    const fit = fitLogNormal(bimodal);
    expect(ksDistanceLogNormal(Float64Array.from(bimodal).sort(), fit.mu, fit.sigma)).toBeGreaterThan(0.15);
  });
});

describe('normal CDF', () => {
  it('agrees with @stdlib to 2e-7 across the range', () => {
    for (let x = -8; x <= 8; x += 0.01) expect(Math.abs(normalCdf(x) - stdlibNormalCdf(x, 0, 1))).toBeLessThan(2e-7);
  });
  it('gives P(ε < 0.6″) = 32.98 % for a log-normal with median 0.70″ and σ 0.35', () => {
    // seeing-physics.md §9 #20
    expect(normalCdf((Math.log(0.6) - Math.log(0.7)) / 0.35)).toBeCloseTo(0.3298, 4);
  });
});

describe('Mann–Whitney', () => {
  it('matches SciPy on two small samples with ties', () => {
    // scipy.stats.mannwhitneyu(a, b, use_continuity=True, alternative="two-sided", method="asymptotic"), SciPy 1.17.1: U = 9.0, p = 0.03166243498948498
    const result = mannWhitney([0.61, 0.72, 0.55, 0.8, 0.72, 0.66, 0.91, 0.58], [0.75, 0.88, 0.72, 0.95, 1.02, 0.83, 0.79]);
    expect(result.u).toBe(9);
    expect(result.pValue).toBeCloseTo(0.03166243498948498, 6);
    expect(result.z).toBeLessThan(0);
  });
  it('matches SciPy on fully separated samples', () => {
    // same SciPy call on [1, 2, 3] vs [4, 5, 6]: U = 0, p = 0.08085559837005224
    const result = mannWhitney([1, 2, 3], [4, 5, 6]);
    expect(result.u).toBe(0);
    expect(result.pValue).toBeCloseTo(0.08085559837005224, 6);
  });
  it('gives p = 1 when every value is equal', () => {
    expect(mannWhitney([1, 1], [1, 1, 1]).pValue).toBe(1);
  });
});

describe('radix argsort', () => {
  it('orders values exactly like a comparison sort, ties kept in input order', () => {
    const random = createRandom(8);
    const values = Float64Array.from({ length: 20000 }, () => (random() < 0.1 ? 0.5 : random() * 3));
    const order = argsortPositive(values);
    const expected = Array.from(values.keys()).sort((left, right) => (values[left] ?? 0) - (values[right] ?? 0) || left - right);
    expect(Array.from(order)).toEqual(expected);
  });
  it('gives the same order by buckets as by the plain radix sort, and the sorted values with it', () => {
    const random = createRandom(11);
    const shapes: (() => number)[] = [
      () => random() * 3,
      () => Math.round(random() * 12) / 4, // heavy ties
      () => Math.exp(300 * (random() - 0.5)), // exponents far apart
      () => 0.75 + random() * 1e-12, // every value in one narrow bucket range
      () => (random() < 0.3 ? 0 : random() < 0.5 ? Number.MIN_VALUE : Number.MAX_VALUE * random()),
    ];
    const inputs = [new Float64Array(0), Float64Array.of(0.7), Float64Array.of(2, 2, 2), Float64Array.of(0.9, 0.5, 0.7)];
    for (const shape of shapes) for (const length of [2, 3, 31, 1000, 40_000]) inputs.push(Float64Array.from({ length }, shape));
    for (const values of inputs) {
      const { order, sorted } = sortPositive(values);
      expect(Array.from(order)).toEqual(Array.from(argsortPositiveByRadix(values)));
      expect(Array.from(sorted)).toEqual(Array.from(order, (index) => values[index] ?? Number.NaN));
    }
  });
  it('refuses negative, −0, infinite and NaN values', () => {
    for (const bad of [-1, -0, Number.POSITIVE_INFINITY, Number.NaN]) expect(() => argsortPositive(Float64Array.of(1, bad))).toThrow(/finite values ≥ 0/);
  });
});

describe('KS distance by blocks', () => {
  /** The definition, one value at a time: the reference the block bounds must reproduce to the last bit. */
  function ksOneByOne(sorted: Float64Array, mu: number, sigma: number): number {
    let distance = 0;
    for (let index = 0; index < sorted.length; index += 1) {
      const model = normalCdf((Math.log(sorted[index] ?? Number.NaN) - mu) / sigma);
      distance = Math.max(distance, (index + 1) / sorted.length - model, model - index / sorted.length);
    }
    return distance;
  }
  it('equals the one-by-one maximum exactly, for good and bad fits and heavy ties', () => {
    const random = createRandom(12);
    const samples = [
      logNormalSample(100_000, 5),
      logNormalSample(3, 6),
      logNormalSample(65, 7),
      Array.from({ length: 20_000 }, () => Math.round(random() * 8) / 8 + 0.125), // steps of 1/8 ″
      [...logNormalSample(5000, 8, 0.5, 0.1), ...logNormalSample(5000, 9, 1.4, 0.1)], // two modes: a poor fit
    ];
    for (const sample of samples) {
      const sorted = Float64Array.from(sample).sort();
      const fit = fitLogNormal(sorted);
      const fast = ksDistanceLogNormalOfLogs(naturalLogs(sorted), fit.mu, fit.sigma);
      expect(fast).toBe(ksOneByOne(sorted, fit.mu, fit.sigma));
      // a parameter set far from the data, where the largest gap sits at one end
      expect(ksDistanceLogNormal(sorted, fit.mu + 1, fit.sigma / 2)).toBe(ksOneByOne(sorted, fit.mu + 1, fit.sigma / 2));
    }
  });
  it('fits from stored logarithms exactly as from the values', () => {
    const sample = logNormalSample(10_001, 13);
    expect(fitLogNormalToLogs(naturalLogs(sample))).toEqual(fitLogNormal(sample));
  });
});

/** A replicate's pooled median computed the slow, obvious way: copy every drawn night's values and sort. */
function naiveReplicateMedians(groups: number[][], replicates: number, seed: number): number[] {
  const random = createRandom(seed);
  const medians: number[] = [];
  for (let replicate = 0; replicate < replicates; replicate += 1) {
    const pooled: number[] = [];
    const draws = Array.from({ length: groups.length }, () => 0);
    for (let draw = 0; draw < groups.length; draw += 1) {
      const group = Math.floor(random() * groups.length);
      draws[group] = (draws[group] ?? 0) + 1;
    }
    groups.forEach((values, group) => {
      for (let copy = 0; copy < (draws[group] ?? 0); copy += 1) pooled.push(...values);
    });
    medians.push(jStat.percentile(pooled, 0.5));
  }
  return medians;
}

function toGrouped(groups: number[][]): { values: Float64Array; offsets: Int32Array } {
  const offsets = new Int32Array(groups.length + 1);
  groups.forEach((values, group) => (offsets[group + 1] = (offsets[group] ?? 0) + values.length));
  return { values: Float64Array.from(groups.flatMap((values) => [...values].sort((left, right) => left - right))), offsets };
}

describe('night bootstrap of the median', () => {
  it('equals the materialised replicate medians exactly, ties included', () => {
    const random = createRandom(9);
    for (const [groupCount, maxSize] of [[1, 5], [2, 3], [7, 40], [60, 30], [300, 9]] as const) {
      // values on a coarse grid so that ties across nights are common
      const groups = Array.from({ length: groupCount }, () => Array.from({ length: 1 + Math.floor(random() * maxSize) }, () => Math.round(random() * 40) / 20 + 0.05));
      const fast = bootstrapPooledMedian(toGrouped(groups), { replicates: 60, seed: groupCount });
      const slow = naiveReplicateMedians(groups, 60, groupCount);
      slow.forEach((median, index) => expect(fast[index]).toBeCloseTo(median, 12));
    }
  });
  it('is reproducible with a fixed seed and changes with another', () => {
    const groups = toGrouped(Array.from({ length: 30 }, (_, night) => logNormalSample(50, night)));
    expect(Array.from(bootstrapPooledMedian(groups, { replicates: 200, seed: 42 }))).toEqual(Array.from(bootstrapPooledMedian(groups, { replicates: 200, seed: 42 })));
    expect(Array.from(bootstrapPooledMedian(groups, { replicates: 200, seed: 43 }))).not.toEqual(Array.from(bootstrapPooledMedian(groups, { replicates: 200, seed: 42 })));
  });
  it('is much wider than a per-sample bootstrap when nights differ strongly', () => {
    // 40 nights, each with its own level (log-normal scatter 0.3) and 200 samples scattered little around it
    const random = createRandom(10);
    const nights = Array.from({ length: 40 }, () => {
      const level = 0.75 * Math.exp(0.3 * normalDeviate(random));
      return Array.from({ length: 200 }, () => level * Math.exp(0.05 * normalDeviate(random)));
    });
    const width = (medians: Float64Array): number => {
      const sorted = Float64Array.from(medians).sort();
      return percentileSorted(sorted, 0.975) - percentileSorted(sorted, 0.025);
    };
    const byNight = width(bootstrapPooledMedian(toGrouped(nights), { replicates: 1000, seed: 1 }));
    // every sample its own block = the ordinary per-sample bootstrap
    const bySample = width(bootstrapPooledMedian(toGrouped(nights.flat().map((value) => [value])), { replicates: 1000, seed: 1 }));
    expect(byNight).toBeGreaterThan(4 * bySample);
  });
  it('equals the materialised replicate medians on long nights that span many grid cells', () => {
    // 25 nights of 500-1500 samples: the pooled replicate spans a few dozen 1024-value cells, so the search probes
    // and walks; night levels differ a lot so replicate medians land far from the overall median
    const random = createRandom(14);
    const nights = Array.from({ length: 25 }, () => {
      const level = 0.75 * Math.exp(0.5 * normalDeviate(random));
      return Array.from({ length: 500 + Math.floor(random() * 1000) }, () => level * Math.exp(0.1 * normalDeviate(random)));
    });
    const fast = bootstrapPooledMedian(toGrouped(nights), { replicates: 20, seed: 3 });
    const slow = naiveReplicateMedians(nights, 20, 3);
    slow.forEach((median, index) => expect(fast[index]).toBeCloseTo(median, 12));
  });
  it('takes pre-sorted values with their group tags and gives the grouped entry point\'s replicates', () => {
    const groups = toGrouped(Array.from({ length: 70 }, (_, night) => logNormalSample(30 + night, 100 + night)));
    const { sorted, groupOf } = sortWithGroups(groups.values, groups.offsets);
    const sizes = Int32Array.from({ length: 70 }, (_, group) => (groups.offsets[group + 1] ?? 0) - (groups.offsets[group] ?? 0));
    expect(Array.from(bootstrapPooledMedianSorted(sorted, groupOf, sizes, { replicates: 300, seed: 5 }))).toEqual(Array.from(bootstrapPooledMedian(groups, { replicates: 300, seed: 5 })));
    expect(() => bootstrapPooledMedianSorted(sorted, groupOf.subarray(1), sizes, { replicates: 3, seed: 5 })).toThrow(/groupOf must tag every sorted value/);
  });
  it('gives NaN, and goes on, for a replicate that draws only empty groups', () => {
    const medians = Array.from(bootstrapPooledMedian({ values: Float64Array.of(1, 2, 3), offsets: Int32Array.of(0, 0, 3, 3) }, { replicates: 50, seed: 4 }));
    expect(medians.every((median) => median === 2 || Number.isNaN(median))).toBe(true);
    expect(medians.filter((median) => Number.isNaN(median)).length).toBeGreaterThan(0);
  });
  it('draws a paired bootstrap once for both sides and gives each side the replicates of its own run', () => {
    // 40 common nights with different sample counts on each side; the pair entry point must equal two separate
    // seeded runs exactly (and, through them, the materialised replicate medians of naiveReplicateMedians)
    const nightsA = Array.from({ length: 40 }, (_, night) => logNormalSample(20 + ((night * 7) % 50), 300 + night));
    const nightsB = Array.from({ length: 40 }, (_, night) => logNormalSample(5 + ((night * 11) % 90), 400 + night, 0.8));
    const side = (nights: number[][]) => {
      const grouped = toGrouped(nights);
      const { sorted, groupOf } = sortWithGroups(grouped.values, grouped.offsets);
      return { sorted, groupOf, groupSizes: Int32Array.from(nights, (night) => night.length) };
    };
    const sideA = side(nightsA);
    const sideB = side(nightsB);
    const pair = bootstrapPooledMedianPairSorted(sideA, sideB, { replicates: 400, seed: 9 });
    expect(Array.from(pair.a)).toEqual(Array.from(bootstrapPooledMedianSorted(sideA.sorted, sideA.groupOf, sideA.groupSizes, { replicates: 400, seed: 9 })));
    expect(Array.from(pair.b)).toEqual(Array.from(bootstrapPooledMedianSorted(sideB.sorted, sideB.groupOf, sideB.groupSizes, { replicates: 400, seed: 9 })));
    naiveReplicateMedians(nightsB, 30, 9).forEach((median, index) => expect(pair.b[index]).toBeCloseTo(median, 12));
    expect(() => bootstrapPooledMedianPairSorted(sideA, side(nightsB.slice(1)), { replicates: 3, seed: 9 })).toThrow(/same groups on both sides/);
  });
  it('RandomStream draws exactly the indices Math.floor(createRandom(seed)() · count) gives', () => {
    for (const seed of [0, 1, 42, 0x9e3779ba, 2 ** 32 - 1]) {
      const random = createRandom(seed);
      const stream = new RandomStream(seed);
      for (let draw = 0; draw < 5000; draw += 1) {
        const count = 1 + (draw % 3700);
        expect(stream.nextIndex(count)).toBe(Math.floor(random() * count));
      }
    }
  });
  it('sortWithGroups tags every sorted value with its group', () => {
    const grouped = toGrouped([[0.3, 0.9], [0.5], [0.1, 0.7]]);
    const { sorted, groupOf } = sortWithGroups(grouped.values, grouped.offsets);
    expect(Array.from(sorted)).toEqual([0.1, 0.3, 0.5, 0.7, 0.9]);
    expect(Array.from(groupOf)).toEqual([2, 0, 1, 2, 0]);
  });
});
