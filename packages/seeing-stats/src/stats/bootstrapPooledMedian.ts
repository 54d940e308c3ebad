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
 * was drawn. Exact, without materialising the replicate: the globally sorted values, each tagged with its group
 * and repeated by its group's draw count, are the sorted replicate, so its k-th smallest value sits at the first
 * global position where the running weighted count reaches k + 1. Per-group counts are kept at grid positions
 * every `cell` values; a binary search over the grid (one weighted sum over the drawn groups per step) finds the
 * cell, and a walk through it, adding each position's weight, finds the position.
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

  // Grid of cumulative per-group counts: gridCounts[g * groupCount + j] = values of group j at positions < g * cell.
  // The cell grows with the number of groups so the grid stays within about 8 million entries.
  const cell = Math.max(256, Math.ceil((total * groupCount) / 8_000_000));
  const gridPoints = Math.ceil(total / cell) + 1;
  const gridCounts = new Int32Array(gridPoints * groupCount);
  const running = new Int32Array(groupCount);
  for (let point = 1; point < gridPoints; point += 1) {
    const end = Math.min(total, point * cell);
    for (let position = (point - 1) * cell; position < end; position += 1) {
      const group = groupOf[position] ?? 0;
      running[group] = (running[group] ?? 0) + 1;
    }
    gridCounts.set(running, point * groupCount);
  }

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
    const weightedCountBefore = (point: number): number => {
      const base = point * groupCount;
      let count = 0;
      for (let slot = 0; slot < activeCount; slot += 1) {
        const group = activeGroups[slot] ?? 0;
        count += (drawCounts[group] ?? 0) * (gridCounts[base + group] ?? 0);
      }
      return count;
    };
    const position = (pooledSize - 1) / 2;
    const rank = Math.floor(position); // type-7 median: order statistics rank and rank + 1 (0-based), interpolated
    const target = rank + 1;

    // Largest grid point whose weighted count of earlier positions is still below target.
    let low = 0;
    let high = gridPoints - 1;
    while (low < high) {
      const middle = (low + high + 1) >>> 1;
      if (weightedCountBefore(middle) < target) low = middle;
      else high = middle - 1;
    }
    let count = weightedCountBefore(low);
    let cursor = low * cell - 1;
    while (count < target) {
      cursor += 1;
      count += drawCounts[groupOf[cursor] ?? 0] ?? 0;
    }
    const lowValue = sorted[cursor] ?? Number.NaN;
    let highValue = lowValue;
    if (position > rank && count < target + 1) {
      while (count < target + 1) {
        cursor += 1;
        count += drawCounts[groupOf[cursor] ?? 0] ?? 0;
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
