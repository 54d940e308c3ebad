import { SeeingInputError } from '../errors.js';
import { argsortPositive } from './argsortPositive.js';
import { RandomStream } from './random.js';

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
  const search = prepareSearch(sorted, groupOf, groupSizes);
  requireReplicates(options.replicates);
  const draws = createDraws(groupSizes.length, options.seed);
  const medians = new Float64Array(options.replicates);
  for (let replicate = 0; replicate < options.replicates; replicate += 1) {
    drawReplicate(draws);
    medians[replicate] = replicateMedian(search, draws);
    clearDraws(draws);
  }
  return medians;
}

/**
 * bootstrapPooledMedianSorted for two sides with the same number of groups and the same seed, as a paired
 * bootstrap over common nights runs it: both sides would make the same draws (same stream, same group count), so
 * each replicate's groups are drawn once and both medians are found from them. Returns exactly what the two
 * separate calls would, in draw order.
 * Throws SeeingInputError when the sides have different numbers of groups (or as bootstrapPooledMedianSorted).
 */
export function bootstrapPooledMedianPairSorted(
  sideA: { sorted: Float64Array; groupOf: Int32Array; groupSizes: Int32Array },
  sideB: { sorted: Float64Array; groupOf: Int32Array; groupSizes: Int32Array },
  options: { replicates: number; seed: number },
): { a: Float64Array; b: Float64Array } {
  if (sideA.groupSizes.length !== sideB.groupSizes.length) {
    throw new SeeingInputError(`a paired bootstrap needs the same groups on both sides, got ${sideA.groupSizes.length} and ${sideB.groupSizes.length}`);
  }
  const searchA = prepareSearch(sideA.sorted, sideA.groupOf, sideA.groupSizes);
  const searchB = prepareSearch(sideB.sorted, sideB.groupOf, sideB.groupSizes);
  requireReplicates(options.replicates);
  const draws = createDraws(sideA.groupSizes.length, options.seed);
  const a = new Float64Array(options.replicates);
  const b = new Float64Array(options.replicates);
  for (let replicate = 0; replicate < options.replicates; replicate += 1) {
    drawReplicate(draws);
    a[replicate] = replicateMedian(searchA, draws);
    b[replicate] = replicateMedian(searchB, draws);
    clearDraws(draws);
  }
  return { a, b };
}

function requireReplicates(replicates: number): void {
  if (!Number.isInteger(replicates) || replicates < 1) {
    throw new SeeingInputError(`replicates must be a positive whole number, got ${String(replicates)}`);
  }
}

/** The sorted values of one side with their grid of per-group counts, built once for all replicates. */
interface ReplicateSearch {
  sorted: Float64Array;
  groupOf: Int32Array;
  groupSizes: Int32Array;
  cell: number;
  gridPoints: number;
  gridCounts: Int32Array;
}

function prepareSearch(sorted: Float64Array, groupOf: Int32Array, groupSizes: Int32Array): ReplicateSearch {
  const groupCount = groupSizes.length;
  const total = sorted.length;
  if (groupCount < 1 || total === 0) throw new SeeingInputError('bootstrapPooledMedian needs at least one group with values');
  if (groupOf.length !== total) throw new SeeingInputError(`groupOf must tag every sorted value, got ${groupOf.length} tags for ${total} values`);
  // A walk through a cell is cheap next to a probe (one multiply-add per drawn group), so cells are long; they
  // grow with the number of groups so the grid stays within about 8 million entries.
  const cell = Math.max(1024, Math.ceil((total * groupCount) / 8_000_000));
  return { sorted, groupOf, groupSizes, cell, gridPoints: Math.ceil(total / cell) + 1, gridCounts: buildGrid(groupOf, groupCount, cell) };
}

/** One replicate's draws: the stream, and the groups drawn at least once (in first-draw order) with their counts. */
interface Draws {
  groupCount: number;
  stream: RandomStream;
  /** Draws of each group in the current replicate; all zero between replicates. */
  drawCounts: Int32Array;
  activeGroups: Int32Array;
  activeWeights: Int32Array;
  activeCount: number;
}

function createDraws(groupCount: number, seed: number): Draws {
  return {
    groupCount,
    // The stream of createRandom(seed), drawn as indices: the same draws, without a boxed number per draw.
    stream: new RandomStream(seed),
    drawCounts: new Int32Array(groupCount),
    activeGroups: new Int32Array(groupCount),
    activeWeights: new Int32Array(groupCount),
    activeCount: 0,
  };
}

/** Draws groupCount groups with replacement (Math.floor(random() · groupCount) each, as createRandom gives). */
function drawReplicate(draws: Draws): void {
  const { groupCount, stream, drawCounts, activeGroups, activeWeights } = draws;
  let activeCount = 0;
  for (let draw = 0; draw < groupCount; draw += 1) {
    const group = stream.nextIndex(groupCount);
    const count = drawCounts[group] ?? 0;
    if (count === 0) {
      activeGroups[activeCount] = group;
      activeCount += 1;
    }
    drawCounts[group] = count + 1;
  }
  for (let slot = 0; slot < activeCount; slot += 1) activeWeights[slot] = drawCounts[activeGroups[slot] ?? 0] ?? 0;
  draws.activeCount = activeCount;
}

function clearDraws(draws: Draws): void {
  const { drawCounts, activeGroups, activeCount } = draws;
  for (let slot = 0; slot < activeCount; slot += 1) drawCounts[activeGroups[slot] ?? 0] = 0;
  draws.activeCount = 0;
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
function weightedCountBefore(search: ReplicateSearch, draws: Draws, point: number): number {
  const { gridCounts } = search;
  const { activeGroups, activeWeights, activeCount } = draws;
  const base = point * search.groupSizes.length;
  let count = 0;
  for (let slot = 0; slot < activeCount; slot += 1) count += (activeWeights[slot] ?? 0) * (gridCounts[base + (activeGroups[slot] ?? 0)] ?? 0);
  return count;
}

/** One replicate's type-7 median among the weighted sorted values, for the groups drawn. */
function replicateMedian(search: ReplicateSearch, draws: Draws): number {
  const { sorted, groupOf, groupSizes, cell, gridPoints } = search;
  const { drawCounts, activeGroups, activeWeights, activeCount } = draws;
  const total = sorted.length;
  // Values in the replicate: each drawn group's size times its draws (the same sum as adding a size per draw).
  let pooledSize = 0;
  for (let slot = 0; slot < activeCount; slot += 1) pooledSize += (activeWeights[slot] ?? 0) * (groupSizes[activeGroups[slot] ?? 0] ?? 0);
  if (pooledSize === 0) return Number.NaN; // only empty groups were drawn

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
    const count = weightedCountBefore(search, draws, point);
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
  return lowValue + (position - rank) * (highValue - lowValue);
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
