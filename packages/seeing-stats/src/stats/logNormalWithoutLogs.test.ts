import { describe, expect, it } from 'vitest';
import { fitLogNormalToLogs, fitLogNormalToPositive, naturalLogs } from './fitLogNormal.js';
import { ksDistanceLogNormalOfLogs, ksDistanceLogNormalOfSortedPositive } from './ksDistanceLogNormal.js';
import { createRandom } from './random.js';

// The summary fits the log-normal without an array of logarithms; these hold it to the array-based functions.
describe('log-normal fit and KS distance without an array of logarithms', () => {
  it('give exactly the numbers of the array-based functions, on small and large sorted samples', () => {
    const random = createRandom(3);
    for (const count of [1, 2, 7, 1000, 50_000]) {
      const sorted = Float64Array.from({ length: count }, () => Math.exp(-0.3 + 0.4 * (random() + random() + random() - 1.5))).sort();
      const logs = naturalLogs(sorted);
      const expected = fitLogNormalToLogs(logs);
      const fit = fitLogNormalToPositive(sorted);
      expect(fit).toStrictEqual(expected);
      if (fit.sigma > 0) expect(ksDistanceLogNormalOfSortedPositive(sorted, fit.mu, fit.sigma)).toBe(ksDistanceLogNormalOfLogs(logs, fit.mu, fit.sigma));
    }
  });
});
