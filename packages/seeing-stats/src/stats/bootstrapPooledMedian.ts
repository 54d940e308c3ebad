import { SeeingInputError } from '../errors.js';
import { createRandom } from './random.js';

export interface GroupedValues {
  /** All values, grouped: group g occupies values[offsets[g]] .. values[offsets[g + 1] − 1], each group sorted ascending. */
  values: Float64Array;
  /** groupCount + 1 offsets into values. */
  offsets: Int32Array;
}

/**
 * Block bootstrap of the pooled median (Efron 1979; resampling whole blocks as recommended for autocorrelated
 * series, e.g. Künsch 1989): each replicate draws as many groups (nights) as there are, with replacement, and
 * takes the type-7 median of all values of the drawn groups, each counted as often as its group was drawn.
 * Exact, without materialising the replicate: the k-th smallest pooled value is found by binary search over the
 * globally sorted values, counting each drawn group's share by binary search weighted by its draw count.
 * Needs at least one group with values. Returns the replicate medians (unsorted, in draw order).
 */
export function bootstrapPooledMedian(groups: GroupedValues, options: { replicates: number; seed: number }): Float64Array {
  const { values, offsets } = groups;
  const groupCount = offsets.length - 1;
  if (groupCount < 1 || values.length === 0) throw new SeeingInputError('bootstrapPooledMedian needs at least one group with values');
  if (!Number.isInteger(options.replicates) || options.replicates < 1) {
    throw new SeeingInputError(`replicates must be a positive whole number, got ${String(options.replicates)}`);
  }
  const globallySorted = Float64Array.from(values).sort();
  const random = createRandom(options.seed);
  const drawCounts = new Int32Array(groupCount);
  const activeGroups = new Int32Array(groupCount);
  const medians = new Float64Array(options.replicates);

  for (let replicate = 0; replicate < options.replicates; replicate += 1) {
    drawCounts.fill(0);
    for (let draw = 0; draw < groupCount; draw += 1) {
      const group = Math.floor(random() * groupCount);
      drawCounts[group] = (drawCounts[group] ?? 0) + 1;
    }
    let activeCount = 0;
    let pooledSize = 0;
    for (let group = 0; group < groupCount; group += 1) {
      const weight = drawCounts[group] ?? 0;
      if (weight > 0) {
        activeGroups[activeCount] = group;
        activeCount += 1;
        pooledSize += weight * ((offsets[group + 1] ?? 0) - (offsets[group] ?? 0));
      }
    }
    // Type-7 median of the pooled replicate: order statistics k and k + 1 (0-based), interpolated.
    const position = (pooledSize - 1) / 2;
    const rank = Math.floor(position);
    const lowValue = kthSmallest(rank);
    let highValue = lowValue;
    if (position > rank) {
      // The (k + 1)-th is the same value when it repeats, else the smallest drawn value above it.
      if (countAtMost(lowValue) < rank + 2) highValue = smallestAbove(lowValue);
    }
    medians[replicate] = lowValue + (position - rank) * (highValue - lowValue);

    function countAtMost(threshold: number): number {
      let count = 0;
      for (let slot = 0; slot < activeCount; slot += 1) {
        const group = activeGroups[slot] ?? 0;
        count += (drawCounts[group] ?? 0) * (upperBound(values, offsets[group] ?? 0, offsets[group + 1] ?? 0, threshold) - (offsets[group] ?? 0));
      }
      return count;
    }
    function kthSmallest(targetRank: number): number {
      // Smallest global index whose value has at least targetRank + 1 pooled values at or below it.
      let low = 0;
      let high = globallySorted.length - 1;
      while (low < high) {
        const middle = (low + high) >>> 1;
        if (countAtMost(globallySorted[middle] ?? 0) >= targetRank + 1) high = middle;
        else low = middle + 1;
      }
      return globallySorted[low] ?? Number.NaN;
    }
    function smallestAbove(threshold: number): number {
      let best = Number.POSITIVE_INFINITY;
      for (let slot = 0; slot < activeCount; slot += 1) {
        const group = activeGroups[slot] ?? 0;
        const index = upperBound(values, offsets[group] ?? 0, offsets[group + 1] ?? 0, threshold);
        if (index < (offsets[group + 1] ?? 0)) {
          const candidate = values[index] ?? Number.POSITIVE_INFINITY;
          if (candidate < best) best = candidate;
        }
      }
      return best;
    }
  }
  return medians;
}

/** First index in sorted[start, end) whose value is greater than threshold. */
export function upperBound(sorted: Float64Array, start: number, end: number, threshold: number): number {
  let low = start;
  let high = end;
  while (low < high) {
    const middle = (low + high) >>> 1;
    if ((sorted[middle] ?? 0) <= threshold) low = middle + 1;
    else high = middle;
  }
  return low;
}
