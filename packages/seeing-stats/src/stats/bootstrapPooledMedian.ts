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
 * was drawn. Needs at least one group with values. Returns the replicate medians in draw order.
 * See bootstrapPooledMedianSorted for the method; this entry point sorts the grouped values itself.
 * Example: bootstrapPooledMedian({ values: Float64Array.of(1, 2, 5), offsets: Int32Array.of(0, 2, 3) }, { replicates: 2, seed: 1 }).
 */
export function bootstrapPooledMedian(
  groups: GroupedValues,
  options: { replicates: number; seed: number; sortedWithGroups?: { sorted: Float64Array; groupOf: Int32Array } },
): Float64Array {
  const { values, offsets } = groups;
  const groupCount = offsets.length - 1;
  if (groupCount < 1 || values.length === 0) throw new SeeingInputError('bootstrapPooledMedian needs at least one group with values');
  const { sorted, groupOf } = options.sortedWithGroups ?? sortWithGroups(values, offsets);
  const groupSizes = new Int32Array(groupCount);
  for (let group = 0; group < groupCount; group += 1) groupSizes[group] = (offsets[group + 1] ?? 0) - (offsets[group] ?? 0);
  return bootstrapPooledMedianSorted(sorted, groupOf, groupSizes, options);
}

/**
 * The night bootstrap of bootstrapPooledMedian on values already sorted ascending, each tagged with its group
 * (groupOf[i] in 0 .. groupCount − 1; groupSizes[g] = how many values group g has). Group g is the g-th draw
 * target, so the same seed gives the same replicates as bootstrapPooledMedian on the same groups.
 * Exact, without materialising a replicate: the globally sorted values, each repeated by its group's draw count,
 * are the sorted replicate, so its k-th smallest value sits at the first global position where the running
 * weighted count reaches k + 1. Per-group counts are kept at grid positions every `cell` values; a search over the
 * grid (one weighted sum over the drawn groups per probe) finds the last grid point still below k + 1, and a walk
 * from it finds the position. That grid point is unique, so however the search finds it the result is the same;
 * the search probes first where the median would sit if the weights were spread evenly, then corrects by the
 * shortfall it saw there (the weighted count grows almost linearly with position), then gallops and bisects if
 * it still has to: about three probes a replicate instead of a dozen for a plain bisection.
 */
export function bootstrapPooledMedianSorted(
  sorted: Float64Array,
  groupOf: Int32Array,
  groupSizes: Int32Array,
  options: { replicates: number; seed: number },
): Float64Array {
  const groupCount = groupSizes.length;
  const total = sorted.length;
  if (groupCount < 1 || total === 0) throw new SeeingInputError('bootstrapPooledMedian needs at least one group with values');
  if (groupOf.length !== total) throw new SeeingInputError(`groupOf must tag every sorted value, got ${groupOf.length} tags for ${total} values`);
  if (!Number.isInteger(options.replicates) || options.replicates < 1) {
    throw new SeeingInputError(`replicates must be a positive whole number, got ${String(options.replicates)}`);
  }
  // A walk through a cell is cheap next to a probe (one multiply-add per drawn group), so cells are long; they
  // grow with the number of groups so the grid stays within about 8 million entries.
  const cell = Math.max(1024, Math.ceil((total * groupCount) / 8_000_000));
  const search: ReplicateSearch = {
    sorted,
    groupOf,
    groupSizes,
    cell,
    gridPoints: Math.ceil(total / cell) + 1,
    gridCounts: buildGrid(groupOf, groupCount, cell),
    random: createRandom(options.seed),
    drawCounts: new Int32Array(groupCount),
    activeGroups: new Int32Array(groupCount),
    activeWeights: new Int32Array(groupCount),
  };
  const medians = new Float64Array(options.replicates);
  for (let replicate = 0; replicate < options.replicates; replicate += 1) medians[replicate] = replicateMedian(search);
  return medians;
}

interface ReplicateSearch {
  sorted: Float64Array;
  groupOf: Int32Array;
  groupSizes: Int32Array;
  cell: number;
  gridPoints: number;
  gridCounts: Int32Array;
  random: () => number;
  /** Draws of each group in the current replicate; all zero between replicates. */
  drawCounts: Int32Array;
  /** The groups drawn at least once, in first-draw order, and their draw counts. */
  activeGroups: Int32Array;
  activeWeights: Int32Array;
}

/** gridCounts[p · groupCount + g] = values of group g at sorted positions below p · cell. */
function buildGrid(groupOf: Int32Array, groupCount: number, cell: number): Int32Array {
  const total = groupOf.length;
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
  return gridCounts;
}

/** Weighted count of the values at sorted positions below point · cell. */
function weightedCountBefore(search: ReplicateSearch, activeCount: number, point: number): number {
  const { gridCounts, activeGroups, activeWeights } = search;
  const base = point * search.groupSizes.length;
  let count = 0;
  for (let slot = 0; slot < activeCount; slot += 1) count += (activeWeights[slot] ?? 0) * (gridCounts[base + (activeGroups[slot] ?? 0)] ?? 0);
  return count;
}

/** One replicate: draw the groups, then find its type-7 median among the weighted sorted values. */
function replicateMedian(search: ReplicateSearch): number {
  const { sorted, groupOf, groupSizes, cell, gridPoints, random, drawCounts, activeGroups, activeWeights } = search;
  const groupCount = groupSizes.length;
  const total = sorted.length;
  let activeCount = 0;
  let pooledSize = 0;
  for (let draw = 0; draw < groupCount; draw += 1) {
    const group = Math.floor(random() * groupCount);
    const draws = drawCounts[group] ?? 0;
    if (draws === 0) {
      activeGroups[activeCount] = group;
      activeCount += 1;
    }
    drawCounts[group] = draws + 1;
    pooledSize += groupSizes[group] ?? 0;
  }
  for (let slot = 0; slot < activeCount; slot += 1) activeWeights[slot] = drawCounts[activeGroups[slot] ?? 0] ?? 0;

  let median = Number.NaN; // stays NaN when only empty groups were drawn
  if (pooledSize > 0) {
    const position = (pooledSize - 1) / 2;
    const rank = Math.floor(position); // type-7 median: order statistics rank and rank + 1 (0-based), interpolated
    const target = rank + 1;

    // Bracket: weighted count below target at lowPoint, at least target at highPoint (gridPoints: past the end).
    let lowPoint = 0;
    let lowCount = 0;
    let highPoint = gridPoints;
    let highCount = pooledSize;
    const probe = (point: number): void => {
      if (point <= lowPoint || point >= highPoint) return;
      const count = weightedCountBefore(search, activeCount, point);
      if (count < target) {
        lowPoint = point;
        lowCount = count;
      } else {
        highPoint = point;
        highCount = count;
      }
    };
    // Where the target would fall were the weights even, then a correction by the shortfall seen there.
    const positionsPerWeight = total / pooledSize;
    const guess = Math.min(gridPoints - 1, Math.floor((target * positionsPerWeight) / cell));
    probe(guess);
    const seenCount = guess === lowPoint ? lowCount : guess === highPoint ? highCount : 0;
    const estimate = Math.floor((guess * cell + (target - seenCount) * positionsPerWeight) / cell);
    probe(estimate);
    probe(estimate + 1);
    // Still open: gallop on from the estimate in the direction it fell short, then bisect what is left.
    const upward = lowPoint > estimate;
    let galloping = upward || highPoint <= estimate;
    for (let step = 2; highPoint - lowPoint > 1; step *= 2) {
      const point = upward ? lowPoint + step : highPoint - step;
      if (galloping && point > lowPoint && point < highPoint) {
        probe(point);
        // Once a probe lands past the crossing the bracket is at most one step wide.
        galloping = upward ? lowPoint === point : highPoint === point;
      } else {
        galloping = false;
        probe((lowPoint + highPoint) >>> 1);
      }
    }

    let count = lowCount;
    let cursor = lowPoint * cell - 1;
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
    median = lowValue + (position - rank) * (highValue - lowValue);
  }
  for (let slot = 0; slot < activeCount; slot += 1) drawCounts[activeGroups[slot] ?? 0] = 0;
  return median;
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
