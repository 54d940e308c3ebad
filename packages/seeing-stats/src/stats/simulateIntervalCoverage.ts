import { SeeingInputError } from '../errors.js';
import { bootstrapPooledMedianSorted, sortWithGroups } from './bootstrapPooledMedian.js';
import { percentileSorted } from './percentile.js';
import { createRandom, normalDeviate } from './random.js';

export interface CoverageOptions {
  /** Campaign lengths to simulate, in nights. */
  nightCounts: readonly number[];
  /** Simulated campaigns per length. */
  trials: number;
  samplesPerNight: number;
  /** Bootstrap replicates per interval. */
  replicates: number;
  seed: number;
  /** True median of the seeing (arcsec); default 0.8. */
  medianArcsec?: number;
  /** σ of ln(night level) between nights; default 0.25. */
  nightSigma?: number;
  /** σ of ln(seeing) within a night; default 0.1. */
  withinNightSigma?: number;
}

export interface CoverageResult {
  nights: number;
  trials: number;
  /** Trials whose interval held the true median. */
  covered: number;
  coverage: number;
}

/**
 * Measures how often the nominal 95 % whole-night bootstrap interval of the pooled median (the interval every
 * summary gives, 2.5–97.5 % percentiles of bootstrapPooledMedianSorted replicates) holds the true median, on
 * simulated campaigns of independent nights: each night has a level medianArcsec · exp(nightSigma · Z), each
 * sample that level · exp(withinNightSigma · Z') (Z, Z' standard normal). ln seeing is then normal with mean
 * ln medianArcsec, so the true median of the population is medianArcsec. Seeded: the same options give the
 * same figures. Needs whole numbers ≥ 1 everywhere. Throws SeeingInputError otherwise.
 * Example: simulateIntervalCoverage({ nightCounts: [1], trials: 10, samplesPerNight: 20, replicates: 50, seed: 1 })
 * → [{ nights: 1, trials: 10, covered: 0, coverage: 0 }] (one night: every replicate is that night).
 */
export function simulateIntervalCoverage(options: CoverageOptions): CoverageResult[] {
  const { trials, samplesPerNight, replicates } = options;
  for (const [name, value] of [['trials', trials], ['samplesPerNight', samplesPerNight], ['replicates', replicates], ...options.nightCounts.map((count) => ['nightCounts', count] as const)] as const) {
    if (!Number.isInteger(value) || value < 1) throw new SeeingInputError(`${name} must be whole numbers ≥ 1, got ${String(value)}`);
  }
  const medianArcsec = options.medianArcsec ?? 0.8;
  const nightSigma = options.nightSigma ?? 0.25;
  const withinNightSigma = options.withinNightSigma ?? 0.1;
  const random = createRandom(options.seed);
  return options.nightCounts.map((nights) => {
    let covered = 0;
    for (let trial = 0; trial < trials; trial += 1) {
      const values = new Float64Array(nights * samplesPerNight);
      const offsets = new Int32Array(nights + 1);
      for (let night = 0; night < nights; night += 1) {
        const level = medianArcsec * Math.exp(nightSigma * normalDeviate(random));
        for (let sample = 0; sample < samplesPerNight; sample += 1) values[night * samplesPerNight + sample] = level * Math.exp(withinNightSigma * normalDeviate(random));
        offsets[night + 1] = (night + 1) * samplesPerNight;
      }
      const { sorted, groupOf } = sortWithGroups(values, offsets);
      const sizes = new Int32Array(nights).fill(samplesPerNight);
      const medians = bootstrapPooledMedianSorted(sorted, groupOf, sizes, { replicates, seed: Math.floor(random() * 2 ** 32) }).sort();
      const low = percentileSorted(medians, 0.025);
      const high = percentileSorted(medians, 0.975);
      if (low <= medianArcsec && medianArcsec <= high) covered += 1;
    }
    return { nights, trials, covered, coverage: covered / trials };
  });
}
