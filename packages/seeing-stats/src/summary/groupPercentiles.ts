import { SeeingInputError } from '../errors.js';

/**
 * Type-7 percentiles (as percentileSorted) of every group of sorted values, in one sequential pass and without
 * regrouping: values sorted ascending, each tagged with its group (groupOfSorted[i] in 0 .. groupCount − 1), arrive
 * in ascending order within each group too, so a group's k-th value is the k-th one seen with its tag. Only the
 * order statistics the percentiles interpolate between are kept.
 * Returns the size of each group and percentiles[g · fractions.length + j] = percentile fractions[j] of group g
 * (NaN for an empty group). Example: groupPercentiles([1, 2, 3, 4], [0, 1, 0, 1], 2, [0.5]) → sizes [2, 2], percentiles [2, 3].
 */
export function groupPercentiles(
  sorted: Float64Array,
  groupOfSorted: Int32Array,
  groupCount: number,
  fractions: readonly number[],
): { sizes: Int32Array; percentiles: Float64Array } {
  if (groupOfSorted.length !== sorted.length) throw new SeeingInputError(`groupOfSorted must tag every sorted value, got ${groupOfSorted.length} tags for ${sorted.length} values`);
  for (const fraction of fractions) {
    if (!(fraction >= 0 && fraction <= 1)) throw new SeeingInputError(`fraction must be a number in [0, 1], got ${String(fraction)}`);
  }
  const sizes = groupSizes(groupOfSorted, groupCount);
  const wanted = wantedRanks(sizes, fractions);
  captureRanks(sorted, groupOfSorted, wanted);

  const fractionCount = fractions.length;
  const percentiles = new Float64Array(groupCount * fractionCount);
  for (let group = 0; group < groupCount; group += 1) {
    const size = sizes[group] ?? 0;
    const start = wanted.start[group] ?? 0;
    const end = wanted.start[group + 1] ?? 0;
    const valueAtRank = (rank: number): number => {
      for (let slot = start; slot < end; slot += 1) if (wanted.ranks[slot] === rank) return wanted.values[slot] ?? Number.NaN;
      return Number.NaN;
    };
    fractions.forEach((fraction, column) => {
      let result = Number.NaN;
      if (size > 0) {
        // The same arithmetic as percentileSorted, so the numbers are identical.
        const position = (size - 1) * fraction;
        const lowIndex = Math.floor(position);
        const low = valueAtRank(lowIndex);
        result = lowIndex + 1 >= size ? low : low + (position - lowIndex) * (valueAtRank(lowIndex + 1) - low);
      }
      percentiles[group * fractionCount + column] = result;
    });
  }
  return { sizes, percentiles };
}

function groupSizes(groupOfSorted: Int32Array, groupCount: number): Int32Array {
  const sizes = new Int32Array(groupCount);
  for (let position = 0; position < groupOfSorted.length; position += 1) {
    const group = groupOfSorted[position] ?? 0;
    sizes[group] = (sizes[group] ?? 0) + 1;
  }
  return sizes;
}

interface WantedRanks {
  /** Group g's wanted ranks (0-based, ascending, distinct) are ranks[start[g]] .. ranks[start[g + 1] − 1]. */
  start: Int32Array;
  ranks: Int32Array;
  /** The value found at each wanted rank. */
  values: Float64Array;
}

function wantedRanks(sizes: Int32Array, fractions: readonly number[]): WantedRanks {
  const groupCount = sizes.length;
  const start = new Int32Array(groupCount + 1);
  const ranks: number[] = [];
  for (let group = 0; group < groupCount; group += 1) {
    const size = sizes[group] ?? 0;
    const groupRanks = new Set<number>();
    for (const fraction of fractions) {
      const lowIndex = Math.floor((size - 1) * fraction);
      if (size > 0) groupRanks.add(lowIndex);
      if (lowIndex + 1 < size) groupRanks.add(lowIndex + 1);
    }
    ranks.push(...[...groupRanks].sort((left, right) => left - right));
    start[group + 1] = ranks.length;
  }
  return { start, ranks: Int32Array.from(ranks), values: new Float64Array(ranks.length) };
}

function captureRanks(sorted: Float64Array, groupOfSorted: Int32Array, wanted: WantedRanks): void {
  const groupCount = wanted.start.length - 1;
  const seen = new Int32Array(groupCount);
  // next[g]: the slot of group g's next wanted rank (equal to start[g + 1] once all are found).
  const next = wanted.start.slice(0, groupCount);
  const { start, ranks, values } = wanted;
  for (let position = 0; position < sorted.length; position += 1) {
    const group = groupOfSorted[position] ?? 0;
    const rank = seen[group] ?? 0;
    seen[group] = rank + 1;
    const slot = next[group] ?? 0;
    if (slot < (start[group + 1] ?? 0) && ranks[slot] === rank) {
      values[slot] = sorted[position] ?? Number.NaN;
      next[group] = slot + 1;
    }
  }
}
