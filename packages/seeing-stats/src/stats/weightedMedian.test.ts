import { describe, expect, it } from 'vitest';
import { percentile } from './percentile.js';
import { createRandom } from './random.js';
import { weightedMedian, weightedMedianSorted } from './weightedMedian.js';

describe('weightedMedian', () => {
  it('gives the first value at which the running weight reaches half the total', () => {
    // by hand: weights 1, 1, 3 add up to 5; the running weight 1, 2, 5 first reaches 2.5 at the third value
    expect(weightedMedian([0.4, 0.6, 0.9], [1, 1, 3])).toBe(0.9);
    // by hand: weights 1/3, 1/3, 1/3, 1 add up to 2; the running weight lands exactly on 1 at 0.7, so (0.7 + 1.2) / 2
    expect(weightedMedian([1.2, 0.6, 0.5, 0.7], [1, 1 / 3, 1 / 3, 1 / 3])).toBeCloseTo(0.95, 12);
  });
  it('equals the ordinary (type 7) median when every weight is the same, for odd and even counts', () => {
    const random = createRandom(31);
    for (const count of [1, 2, 5, 10, 101, 1000]) {
      const values = Array.from({ length: count }, () => 0.3 + random());
      // percentile() is checked against numpy's "linear" percentiles in stats.test.ts
      expect(weightedMedian(values, values.map(() => 0.25))).toBeCloseTo(percentile(values, 0.5), 12);
    }
  });
  it('agrees between the sorting entry point and the presorted one', () => {
    expect(weightedMedianSorted([0.5, 0.6, 0.7, 1.2], [1 / 3, 1 / 3, 1 / 3, 1])).toBeCloseTo(0.95, 12);
  });
  it('refuses no values, a weight of zero and a value that is not finite', () => {
    expect(() => weightedMedian([], [])).toThrow(/at least one value/);
    expect(() => weightedMedian([1, 2], [1, 0])).toThrow(/weights must be positive finite numbers, got 0 at index 1/);
    expect(() => weightedMedian([1, Number.NaN], [1, 1])).toThrow(/finite values, got NaN at index 1/);
    expect(() => weightedMedian([1, 2], [1])).toThrow(/one weight per value/);
  });
});
