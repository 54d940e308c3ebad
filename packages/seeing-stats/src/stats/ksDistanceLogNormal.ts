import { SeeingInputError } from '../errors.js';
import { normalCdf } from './normalCdf.js';

/**
 * Kolmogorov–Smirnov distance D = sup |F_n(x) − F(x)| between the empirical distribution of values sorted
 * ascending and the log-normal with parameters mu, sigma (of ln x); both sides of each step are checked.
 * Needs at least one value and sigma > 0. Example: ksDistanceLogNormal([1], 0, 1) → 0.5.
 */
export function ksDistanceLogNormal(sorted: ArrayLike<number>, mu: number, sigma: number): number {
  const count = sorted.length;
  if (count === 0) throw new SeeingInputError('ksDistanceLogNormal needs at least one value, got none');
  if (!(sigma > 0)) throw new SeeingInputError(`sigma must be a positive number (of ln units), got ${String(sigma)}`);
  let distance = 0;
  for (let index = 0; index < count; index += 1) {
    const model = normalCdf((Math.log(sorted[index] ?? Number.NaN) - mu) / sigma);
    const above = (index + 1) / count - model;
    const below = model - index / count;
    if (above > distance) distance = above;
    if (below > distance) distance = below;
  }
  return distance;
}
