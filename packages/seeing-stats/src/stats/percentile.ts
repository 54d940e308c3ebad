import { SeeingInputError } from '../errors.js';

/**
 * Percentile of values already sorted ascending, by linear interpolation between order statistics
 * (Hyndman & Fan 1996 type 7, the default of numpy and R): h = (n − 1) p, x[⌊h⌋] + (h − ⌊h⌋)(x[⌊h⌋+1] − x[⌊h⌋]).
 * fraction is in [0, 1]; needs at least one value. Example: percentileSorted([1, 2, 3, 4], 0.25) → 1.75.
 */
export function percentileSorted(sorted: ArrayLike<number>, fraction: number): number {
  const count = sorted.length;
  if (count === 0) throw new SeeingInputError('percentile needs at least one value, got none');
  if (!(fraction >= 0 && fraction <= 1)) throw new SeeingInputError(`fraction must be a number in [0, 1], got ${String(fraction)}`);
  const position = (count - 1) * fraction;
  const lowIndex = Math.floor(position);
  const low = sorted[lowIndex] ?? Number.NaN;
  if (lowIndex + 1 >= count) return low;
  const high = sorted[lowIndex + 1] ?? Number.NaN;
  return low + (position - lowIndex) * (high - low);
}

/** Percentile of unsorted values (a sorted copy is made). Example: percentile([3, 1, 2], 0.5) → 2. */
export function percentile(values: ArrayLike<number>, fraction: number): number {
  const sorted = Float64Array.from(values).sort();
  return percentileSorted(sorted, fraction);
}
