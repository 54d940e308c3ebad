import { SeeingInputError } from '../errors.js';
import { RandomStream } from './random.js';

/**
 * Block bootstrap of a pooled fraction (Efron 1979, whole groups resampled as in bootstrapPooledMedian): group g
 * has groupSizes[g] values of which hitCounts[g] count (e.g. samples of a night below a seeing threshold); each
 * replicate draws as many groups as there are, with replacement, and gives Σ hits / Σ sizes over the drawn groups
 * (NaN when only empty groups were drawn). Returns the replicate fractions in draw order.
 * Needs at least one group, equal lengths, 0 ≤ hitCounts[g] ≤ groupSizes[g], replicates a whole number ≥ 1.
 * Throws SeeingInputError otherwise.
 * Example: bootstrapGroupFraction(Int32Array.of(2, 0), Int32Array.of(2, 2), { replicates: 3, seed: 1 }) → three of 0, 0.5 or 1.
 */
export function bootstrapGroupFraction(hitCounts: Int32Array, groupSizes: Int32Array, options: { replicates: number; seed: number }): Float64Array {
  const groupCount = groupSizes.length;
  if (groupCount < 1) throw new SeeingInputError('bootstrapGroupFraction needs at least one group');
  if (hitCounts.length !== groupCount) throw new SeeingInputError(`hitCounts must give one count per group, got ${hitCounts.length} for ${groupCount} groups`);
  if (!Number.isInteger(options.replicates) || options.replicates < 1) {
    throw new SeeingInputError(`replicates must be a positive whole number, got ${String(options.replicates)}`);
  }
  for (let group = 0; group < groupCount; group += 1) {
    const hits = hitCounts[group] ?? 0;
    if (hits < 0 || hits > (groupSizes[group] ?? 0)) throw new SeeingInputError(`hitCounts[${group}] must be between 0 and the group size ${groupSizes[group] ?? 0}, got ${hits}`);
  }
  // The stream of createRandom(seed), drawn as indices (the same draws, without a boxed number per draw).
  const stream = new RandomStream(options.seed);
  const fractions = new Float64Array(options.replicates);
  for (let replicate = 0; replicate < options.replicates; replicate += 1) {
    let hits = 0;
    let size = 0;
    for (let draw = 0; draw < groupCount; draw += 1) {
      const group = stream.nextIndex(groupCount);
      hits += hitCounts[group] ?? 0;
      size += groupSizes[group] ?? 0;
    }
    fractions[replicate] = size > 0 ? hits / size : Number.NaN;
  }
  return fractions;
}
