import { SeeingInputError } from '../errors.js';

/**
 * Type-7 percentiles (as percentileSorted) of every group of sorted values, in one sequential pass and without
 * regrouping: values sorted ascending, each tagged with its group (groupOfSorted[i] in 0 .. groupCount − 1), arrive
 * in ascending order within each group too, so a group's k-th value is the k-th one seen with its tag. Only the
 * order statistics the percentiles interpolate between are kept (see RankCapture).
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
  const sizes = new Int32Array(groupCount);
  for (let position = 0; position < groupOfSorted.length; position += 1) {
    const group = groupOfSorted[position] ?? 0;
    sizes[group] = (sizes[group] ?? 0) + 1;
  }
  const capture = new RankCapture(sizes, fractions);
  for (let position = 0; position < sorted.length; position += 1) capture.take(groupOfSorted[position] ?? 0, sorted[position] ?? Number.NaN);
  return { sizes, percentiles: capture.percentiles() };
}

/**
 * Collects, from values fed in ascending order with their group, the order statistics that the type-7 percentiles
 * of each group interpolate between (ranks ⌊(m − 1)p⌋ and the next, for a group of m values), and then gives the
 * percentiles with the same arithmetic as percentileSorted, so the numbers are identical to sorting each group.
 * Group sizes must be known beforehand. Several captures can share one pass over the values.
 */
export class RankCapture {
  readonly sizes: Int32Array;
  private readonly fractions: readonly number[];
  /** Group g's wanted ranks (0-based, ascending, distinct) are ranks[start[g]] .. ranks[start[g + 1] − 1]. */
  private readonly start: Int32Array;
  private readonly ranks: Int32Array;
  /** The value found at each wanted rank. */
  private readonly values: Float64Array;
  /** Values seen so far per group, and the slot of each group's next wanted rank. */
  private readonly seen: Int32Array;
  private readonly next: Int32Array;

  constructor(sizes: Int32Array, fractions: readonly number[]) {
    for (const fraction of fractions) {
      if (!(fraction >= 0 && fraction <= 1)) throw new SeeingInputError(`fraction must be a number in [0, 1], got ${String(fraction)}`);
    }
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
    this.sizes = sizes;
    this.fractions = fractions;
    this.start = start;
    this.ranks = Int32Array.from(ranks);
    this.values = new Float64Array(ranks.length);
    this.seen = new Int32Array(groupCount);
    this.next = start.slice(0, groupCount);
  }

  /** The next value of a group, in ascending order. */
  take(group: number, value: number): void {
    const rank = this.seen[group] ?? 0;
    this.seen[group] = rank + 1;
    const slot = this.next[group] ?? 0;
    if (slot < (this.start[group + 1] ?? 0) && this.ranks[slot] === rank) {
      this.values[slot] = value;
      this.next[group] = slot + 1;
    }
  }

  /** percentiles[g · fractions.length + j] = percentile fractions[j] of group g; NaN for an empty group. */
  percentiles(): Float64Array {
    const groupCount = this.sizes.length;
    const fractionCount = this.fractions.length;
    const result = new Float64Array(groupCount * fractionCount);
    for (let group = 0; group < groupCount; group += 1) {
      const size = this.sizes[group] ?? 0;
      const start = this.start[group] ?? 0;
      const end = this.start[group + 1] ?? 0;
      const valueAtRank = (rank: number): number => {
        for (let slot = start; slot < end; slot += 1) if (this.ranks[slot] === rank) return this.values[slot] ?? Number.NaN;
        return Number.NaN;
      };
      this.fractions.forEach((fraction, column) => {
        let percentile = Number.NaN;
        if (size > 0) {
          // The arithmetic of percentileSorted, step for step.
          const position = (size - 1) * fraction;
          const lowIndex = Math.floor(position);
          const low = valueAtRank(lowIndex);
          percentile = lowIndex + 1 >= size ? low : low + (position - lowIndex) * (valueAtRank(lowIndex + 1) - low);
        }
        result[group * fractionCount + column] = percentile;
      });
    }
    return result;
  }
}
