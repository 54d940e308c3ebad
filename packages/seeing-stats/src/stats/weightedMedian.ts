import { SeeingInputError } from '../errors.js';

/**
 * Weighted median: sort the values, add up their weights in that order, and take the first value at which the
 * running weight reaches half the total. When the running weight lands exactly on half (within 1e-12 of the
 * total), the median is the mean of that value and the next one, so with equal weights the result is the ordinary
 * median (type 7: the mean of the two middle values for an even count). This is the usual definition of the
 * weighted median (Edgeworth 1888; e.g. Cormen et al., "Introduction to Algorithms", problem 9-2, which takes
 * the lower of the two in the tie case; the mean of both is the symmetric convention).
 * Needs at least one value, every value finite and every weight finite and > 0. Throws SeeingInputError otherwise.
 * Example: weightedMedian([0.5, 0.6, 0.7, 1.2], [1/3, 1/3, 1/3, 1]) → 0.95.
 */
export function weightedMedian(values: ArrayLike<number>, weights: ArrayLike<number>): number {
  const count = values.length;
  if (count === 0) throw new SeeingInputError('weightedMedian needs at least one value, got none');
  if (weights.length !== count) throw new SeeingInputError(`weights must give one weight per value, got ${weights.length} weights for ${count} values`);
  const order = new Uint32Array(count);
  let totalWeight = 0;
  for (let index = 0; index < count; index += 1) {
    const value = values[index] ?? Number.NaN;
    const weight = weights[index] ?? Number.NaN;
    if (!Number.isFinite(value)) throw new SeeingInputError(`weightedMedian needs finite values, got ${String(value)} at index ${index}`);
    if (!(weight > 0 && Number.isFinite(weight))) throw new SeeingInputError(`weights must be positive finite numbers, got ${String(weight)} at index ${index}`);
    order[index] = index;
    totalWeight += weight;
  }
  order.sort((left, right) => (values[left] ?? 0) - (values[right] ?? 0));
  const sortedValues = new Float64Array(count);
  const sortedWeights = new Float64Array(count);
  for (let position = 0; position < count; position += 1) {
    const index = order[position] ?? 0;
    sortedValues[position] = values[index] ?? Number.NaN;
    sortedWeights[position] = weights[index] ?? Number.NaN;
  }
  return weightedMedianSorted(sortedValues, sortedWeights, totalWeight);
}

/**
 * weightedMedian of values already sorted ascending, weights[i] belonging to sorted[i]; totalWeight is their sum
 * when the caller has it (it is added up otherwise). No checks beyond a non-empty input: for callers that
 * validated the values already, e.g. a summary walking its sorted seeing column.
 * Example: weightedMedianSorted([0.5, 0.6, 0.7, 1.2], [1/3, 1/3, 1/3, 1]) → 0.95.
 */
export function weightedMedianSorted(sorted: ArrayLike<number>, weights: ArrayLike<number>, totalWeight?: number): number {
  const count = sorted.length;
  if (count === 0) throw new SeeingInputError('weightedMedian needs at least one value, got none');
  let total = totalWeight ?? 0;
  if (totalWeight === undefined) for (let position = 0; position < count; position += 1) total += weights[position] ?? 0;
  const half = total / 2;
  const tolerance = total * 1e-12;
  let running = 0;
  for (let position = 0; position < count; position += 1) {
    running += weights[position] ?? 0;
    if (running >= half - tolerance) {
      const value = sorted[position] ?? Number.NaN;
      if (Math.abs(running - half) <= tolerance && position + 1 < count) return (value + (sorted[position + 1] ?? Number.NaN)) / 2;
      return value;
    }
  }
  return sorted[count - 1] ?? Number.NaN;
}
