import { SeeingInputError } from '../errors.js';
import { argsortPositive } from './argsortPositive.js';
import { createRandom } from './random.js';

export interface GroupedValues {
  /** All values, grouped: group g occupies values[offsets[g]] .. values[offsets[g + 1] − 1], each group sorted ascending. */
  values: Float64Array;
  /** groupCount + 1 offsets into values. */
  offsets: Int32Array;
}

/**
 * Block bootstrap of the pooled median (Efron 1979; whole blocks are resampled because values within a block,
 * here a night, are correlated, as in Künsch 1989): each replicate draws as many groups as there are, with
 * replacement, and takes the type-7 median of the values of all drawn groups, each counted as often as its group
 * was drawn. Exact, without materialising the replicate. The globally sorted values, each tagged with its group,
 * listed with every value repeated by its group's draw count, are the sorted replicate; so the k-th smallest is
 * the first global position where the running weighted count reaches k + 1. The running count at one position is
 * found by binary searches in the drawn groups; from a start near the overall median the search gallops to a
 * bracket and then walks it, adding each position's weight.
 * Needs at least one group with values. Returns the replicate medians in draw order.
 */
export function bootstrapPooledMedian(
  groups: GroupedValues,
  options: { replicates: number; seed: number; sortedWithGroups?: { sorted: Float64Array; groupOf: Int32Array } },
): Float64Array {
  const { values, offsets } = groups;
  const groupCount = offsets.length - 1;
  const total = values.length;
  if (groupCount < 1 || total === 0) throw new SeeingInputError('bootstrapPooledMedian needs at least one group with values');
  if (!Number.isInteger(options.replicates) || options.replicates < 1) {
    throw new SeeingInputError(`replicates must be a positive whole number, got ${String(options.replicates)}`);
  }
  const { sorted, groupOf } = options.sortedWithGroups ?? sortWithGroups(values, offsets);
  const random = createRandom(options.seed);
  const drawCounts = new Int32Array(groupCount);
  const activeGroups = new Int32Array(groupCount);
  const medians = new Float64Array(options.replicates);
  let activeCount = 0;

  /** Σ over drawn groups of draw count × (values ≤ threshold): the running weighted count up to the last copy of threshold. */
  const countAtMost = (threshold: number): number => {
    let count = 0;
    for (let slot = 0; slot < activeCount; slot += 1) {
      const group = activeGroups[slot] ?? 0;
      const start = offsets[group] ?? 0;
      count += (drawCounts[group] ?? 0) * (upperBound(values, start, offsets[group + 1] ?? 0, threshold) - start);
    }
    return count;
  };
  /** Last global position holding the same value as position (ties are adjacent). */
  const lastOfTies = (position: number): number => upperBound(sorted, position, total, sorted[position] ?? 0) - 1;

  for (let replicate = 0; replicate < options.replicates; replicate += 1) {
    drawCounts.fill(0);
    for (let draw = 0; draw < groupCount; draw += 1) {
      const group = Math.floor(random() * groupCount);
      drawCounts[group] = (drawCounts[group] ?? 0) + 1;
    }
    activeCount = 0;
    let pooledSize = 0;
    for (let group = 0; group < groupCount; group += 1) {
      const weight = drawCounts[group] ?? 0;
      if (weight > 0) {
        activeGroups[activeCount] = group;
        activeCount += 1;
        pooledSize += weight * ((offsets[group + 1] ?? 0) - (offsets[group] ?? 0));
      }
    }
    const position = (pooledSize - 1) / 2;
    const rank = Math.floor(position); // type-7 median: order statistics rank and rank + 1 (0-based), interpolated
    const target = rank + 1;

    // Find a start position whose running count is below target, near the answer.
    const step = Math.max(64, activeCount * 8);
    let start = -1; // position before the walk; its running count is known
    let startCount = 0;
    let probe = lastOfTies(Math.min(total - 1, Math.max(0, Math.floor((total - 1) / 2))));
    let probeCount = countAtMost(sorted[probe] ?? 0);
    let stride = step;
    if (probeCount < target) {
      for (;;) {
        start = probe;
        startCount = probeCount;
        const next = Math.min(total - 1, probe + stride);
        if (next === probe) break;
        probe = lastOfTies(next);
        probeCount = countAtMost(sorted[probe] ?? 0);
        if (probeCount >= target) break;
        stride *= 2;
      }
    } else {
      for (;;) {
        const next = probe - stride;
        if (next < 0) {
          start = -1;
          startCount = 0;
          break;
        }
        probe = lastOfTies(next);
        probeCount = countAtMost(sorted[probe] ?? 0);
        if (probeCount < target) {
          start = probe;
          startCount = probeCount;
          break;
        }
        stride *= 2;
      }
    }

    // Walk from start, adding each position's weight, to the rank-th and (rank + 1)-th pooled values.
    let running = startCount;
    let cursor = start;
    while (running < target) {
      cursor += 1;
      running += drawCounts[groupOf[cursor] ?? 0] ?? 0;
    }
    const lowValue = sorted[cursor] ?? Number.NaN;
    let highValue = lowValue;
    if (position > rank && running < target + 1) {
      while (running < target + 1) {
        cursor += 1;
        running += drawCounts[groupOf[cursor] ?? 0] ?? 0;
      }
      highValue = sorted[cursor] ?? Number.NaN;
    }
    medians[replicate] = lowValue + (position - rank) * (highValue - lowValue);
  }
  return medians;
}

/** All values sorted ascending, and the group each sorted position came from. */
export function sortWithGroups(values: Float64Array, offsets: Int32Array): { sorted: Float64Array; groupOf: Int32Array } {
  const total = values.length;
  const groupOfIndex = new Int32Array(total);
  for (let group = 0; group + 1 < offsets.length; group += 1) groupOfIndex.fill(group, offsets[group] ?? 0, offsets[group + 1] ?? 0);
  const order = argsortPositive(values);
  const sorted = new Float64Array(total);
  const groupOf = new Int32Array(total);
  for (let position = 0; position < total; position += 1) {
    const index = order[position] ?? 0;
    sorted[position] = values[index] ?? Number.NaN;
    groupOf[position] = groupOfIndex[index] ?? 0;
  }
  return { sorted, groupOf };
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
