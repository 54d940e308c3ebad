import { SeeingInputError } from '../errors.js';

export interface LogNormalFit {
  /** Mean of ln ε. */
  mu: number;
  /** Standard deviation of ln ε with divisor n (the maximum-likelihood estimate). */
  sigma: number;
  /** e^μ, in the unit of the values. */
  median: number;
}

/**
 * Maximum-likelihood log-normal fit: μ = mean(ln x), σ² = Σ(ln x − μ)² / n (divisor n, not n − 1).
 * Needs at least one value, all > 0. Example: fitLogNormal([0.5, 1, 2]) → { mu: 0, sigma: 0.5660, median: 1 }.
 */
export function fitLogNormal(values: ArrayLike<number>): LogNormalFit {
  return fitLogNormalToLogs(naturalLogs(values));
}

/**
 * ln x of every value, in order, for fitLogNormalToLogs and ksDistanceLogNormalOfLogs (so a summary takes each
 * logarithm once). Needs at least one value, all > 0. Example: naturalLogs([1, Math.E]) → [0, 1].
 */
export function naturalLogs(values: ArrayLike<number>): Float64Array {
  const count = values.length;
  if (count === 0) throw new SeeingInputError('fitLogNormal needs at least one value, got none');
  const logValues = new Float64Array(count);
  for (let index = 0; index < count; index += 1) {
    const value = values[index] ?? Number.NaN;
    if (!(value > 0)) throw new SeeingInputError(`fitLogNormal needs values > 0, got ${String(value)} at index ${index}`);
    logValues[index] = Math.log(value);
  }
  return logValues;
}

/** fitLogNormal from the logarithms of the values (ln x, in the values' order). Needs at least one. */
export function fitLogNormalToLogs(logValues: Float64Array): LogNormalFit {
  const count = logValues.length;
  if (count === 0) throw new SeeingInputError('fitLogNormal needs at least one value, got none');
  let sumLog = 0;
  for (let index = 0; index < count; index += 1) sumLog += logValues[index] ?? Number.NaN;
  const mu = sumLog / count;
  // Second pass on the deviations, not Σln² − nμ², to avoid cancellation on large samples.
  let sumSquaredDeviation = 0;
  for (let index = 0; index < count; index += 1) {
    const deviation = (logValues[index] ?? Number.NaN) - mu;
    sumSquaredDeviation += deviation * deviation;
  }
  const sigma = Math.sqrt(sumSquaredDeviation / count);
  return { mu, sigma, median: Math.exp(mu) };
}

/**
 * fitLogNormalToLogs(naturalLogs(values)) without the array of logarithms: each ln x is worked out where it is
 * used (twice a value), with the same additions in the same order, so the same fit. For values already checked to
 * be positive and finite (a summary's sorted seeing), where a million samples would need 8 MB of logarithms.
 */
export function fitLogNormalToPositive(values: Float64Array): LogNormalFit {
  const count = values.length;
  if (count === 0) throw new SeeingInputError('fitLogNormal needs at least one value, got none');
  let sumLog = 0;
  for (let index = 0; index < count; index += 1) sumLog += Math.log(values[index] ?? Number.NaN);
  const mu = sumLog / count;
  let sumSquaredDeviation = 0;
  for (let index = 0; index < count; index += 1) {
    const deviation = Math.log(values[index] ?? Number.NaN) - mu;
    sumSquaredDeviation += deviation * deviation;
  }
  const sigma = Math.sqrt(sumSquaredDeviation / count);
  return { mu, sigma, median: Math.exp(mu) };
}
