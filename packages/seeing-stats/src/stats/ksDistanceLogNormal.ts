import { SeeingInputError } from '../errors.js';
import { normalCdf } from './normalCdf.js';

/** Values per block whose model CDF is bounded from the block's two ends before any is computed one by one. */
const BLOCK_SIZE = 64;
/**
 * Slack on those bounds. The fitted Φ is monotone only to within twice its error (< 1.2e-7, normalCdf.ts), so a
 * block is passed over only when even its bound, widened by this much, stays below the distance already found.
 */
const BOUND_SLACK = 1e-6;

/**
 * Kolmogorov–Smirnov distance D = sup |F_n(x) − F(x)| between the empirical distribution of values sorted
 * ascending and the log-normal with parameters mu, sigma (of ln x); both sides of each step are checked.
 * Needs at least one value and sigma > 0. Example: ksDistanceLogNormal([1], 0, 1) → 0.5.
 */
export function ksDistanceLogNormal(sorted: ArrayLike<number>, mu: number, sigma: number): number {
  const count = sorted.length;
  if (count === 0) throw new SeeingInputError('ksDistanceLogNormal needs at least one value, got none');
  const logValues = new Float64Array(count);
  for (let index = 0; index < count; index += 1) logValues[index] = Math.log(sorted[index] ?? Number.NaN);
  return ksDistanceLogNormalOfLogs(logValues, mu, sigma);
}

/**
 * ksDistanceLogNormal from ln x of the sorted values. The same D, found with far fewer CDF evaluations: F is
 * increasing, so within a block of sorted values F lies between its values at the block's ends, which bounds both
 * step differences; a block whose bound cannot beat the distance found so far (from every block's ends) is skipped.
 * Every value that can matter is still evaluated with the same expression, so the maximum is the same number.
 */
export function ksDistanceLogNormalOfLogs(sortedLogs: Float64Array, mu: number, sigma: number): number {
  return ksDistanceOf(sortedLogs.length, (index) => sortedLogs[index] ?? Number.NaN, mu, sigma);
}

/**
 * ksDistanceLogNormalOfLogs(naturalLogs(sorted), mu, sigma) without the array of logarithms: ln x is worked out for
 * the few values the search evaluates. The same number. For sorted values already checked to be positive.
 */
export function ksDistanceLogNormalOfSortedPositive(sorted: Float64Array, mu: number, sigma: number): number {
  return ksDistanceOf(sorted.length, (index) => Math.log(sorted[index] ?? Number.NaN), mu, sigma);
}

function ksDistanceOf(count: number, logAt: (index: number) => number, mu: number, sigma: number): number {
  if (count === 0) throw new SeeingInputError('ksDistanceLogNormal needs at least one value, got none');
  if (!(sigma > 0)) throw new SeeingInputError(`sigma must be a positive number (of ln units), got ${String(sigma)}`);
  const model = (index: number): number => normalCdf((logAt(index) - mu) / sigma);
  // Plain comparisons throughout (no Math.max), so NaN and signed zeros fare exactly as in a one-by-one loop.
  let distance = 0;
  const consider = (index: number, modelValue: number): void => {
    const above = (index + 1) / count - modelValue;
    const below = modelValue - index / count;
    if (above > distance) distance = above;
    if (below > distance) distance = below;
  };

  // First the block ends: a lower bound on D, and F at both ends of every block.
  const blockCount = Math.ceil(count / BLOCK_SIZE);
  const modelAtFirst = new Float64Array(blockCount);
  const modelAtLast = new Float64Array(blockCount);
  for (let block = 0; block < blockCount; block += 1) {
    const first = block * BLOCK_SIZE;
    const last = Math.min(count, first + BLOCK_SIZE) - 1;
    const firstModel = model(first);
    const lastModel = model(last);
    modelAtFirst[block] = firstModel;
    modelAtLast[block] = lastModel;
    consider(first, firstModel);
    consider(last, lastModel);
  }
  // Then every block whose values could still reach beyond it.
  for (let block = 0; block < blockCount; block += 1) {
    const first = block * BLOCK_SIZE;
    const last = Math.min(count, first + BLOCK_SIZE) - 1;
    const aboveBound = (last + 1) / count - (modelAtFirst[block] ?? 0);
    const belowBound = (modelAtLast[block] ?? 1) - first / count;
    if (aboveBound + BOUND_SLACK < distance && belowBound + BOUND_SLACK < distance) continue;
    for (let index = first + 1; index < last; index += 1) consider(index, model(index));
  }
  return distance;
}
