import { bootstrapPooledMedian } from '../stats/bootstrapPooledMedian.js';
import { nightIntervalStatus, MINIMUM_NIGHTS_FOR_INTERVAL, type NightIntervalStatus } from '../stats/nightIntervalStatus.js';
import { percentileSorted } from '../stats/percentile.js';
import { wilcoxonSignedRank, type WilcoxonSignedRankResult } from '../stats/wilcoxonSignedRank.js';
import { pairNights, type PairedNight, type PairingOptions } from './pairNights.js';
import type { SampleColumns } from './summarizeSeeing.js';

export interface PairedComparison {
  commonNights: number;
  matching: 'nights' | 'bins';
  binMinutes: number | null;
  /** Samples of each site on the common nights (after bin matching when asked for). */
  samplesA: number;
  samplesB: number;
  /** Pooled type-7 medians of each site on the common nights; null without common nights. */
  medianA: number | null;
  medianB: number | null;
  /** medianA − medianB (arcsec; negative: A is sharper); null without common nights. */
  medianDifferenceArcsec: number | null;
  /** 95 % interval of medianDifferenceArcsec from resampling common nights (both sites together); null below 10 nights. */
  ci95: [number, number] | null;
  interval: NightIntervalStatus;
  /** The night-by-night differences of nightly medians (A − B) and their type-7 percentiles (null without nights). */
  nightlyDifferences: { nights: PairedNight[]; p10: number | null; p25: number | null; median: number | null; p75: number | null; p90: number | null };
  /** Wilcoxon signed-rank test on the nightly differences; null below 10 common nights or when every difference is 0. */
  wilcoxon: WilcoxonSignedRankResult | null;
  /** 'a_sharper' / 'b_sharper' when the 95 % interval leaves out 0, else 'no_clear_difference'; null below 10 common nights. */
  verdict: 'a_sharper' | 'b_sharper' | 'no_clear_difference' | null;
  /** Why there is no verdict (null when there is one). */
  reason: string | null;
}

/**
 * Paired comparison of two sites on the nights both monitors ran (pairNights; optionally matched in time bins):
 * the pooled medians of each site on those nights and their difference, with a 95 % interval from a night-block
 * bootstrap that resamples the common nights jointly: each replicate draws the same nights for both sites (the two
 * bootstrapPooledMedian runs share one seed and the same number of nights, so they draw identical night sequences),
 * which keeps the weather the sites shared in every replicate (Efron 1979; night blocks per common practice).
 * Also the distribution of the night-by-night differences of nightly medians and the Wilcoxon signed-rank test on
 * them. Below 10 common nights there is no interval, no test and no verdict (reason says so).
 * Needs valid columns (see pairNights). Example: B = A + 0.1″ on 40 common nights → difference −0.1″, ci95 [−0.1, −0.1], 'a_sharper'.
 */
export function comparePairedNights(siteA: SampleColumns, siteB: SampleColumns, options: PairingOptions & { bootstrapReplicates?: number; seed?: number } = {}): PairedComparison {
  const pairing = pairNights(siteA, siteB, options);
  const commonNights = pairing.nights.length;
  const interval = nightIntervalStatus(commonNights);
  const sortedDifferences = Float64Array.from(pairing.nights, (night) => night.differenceArcsec).sort();
  const differencePercentile = (fraction: number): number | null => (commonNights > 0 ? percentileSorted(sortedDifferences, fraction) : null);
  const nightlyDifferences = {
    nights: pairing.nights,
    p10: differencePercentile(0.1),
    p25: differencePercentile(0.25),
    median: differencePercentile(0.5),
    p75: differencePercentile(0.75),
    p90: differencePercentile(0.9),
  };
  const pooledMedian = (values: Float64Array): number | null => (values.length > 0 ? percentileSorted(Float64Array.from(values).sort(), 0.5) : null);
  const medianA = pooledMedian(pairing.groupedA.values);
  const medianB = pooledMedian(pairing.groupedB.values);
  const base = {
    commonNights,
    matching: pairing.matching,
    binMinutes: pairing.binMinutes,
    samplesA: pairing.groupedA.values.length,
    samplesB: pairing.groupedB.values.length,
    medianA,
    medianB,
    medianDifferenceArcsec: medianA === null || medianB === null ? null : medianA - medianB,
    interval,
    nightlyDifferences,
  };
  if (commonNights < MINIMUM_NIGHTS_FOR_INTERVAL) {
    return { ...base, ci95: null, wilcoxon: null, verdict: null, reason: `fewer than ${MINIMUM_NIGHTS_FOR_INTERVAL} common nights (${commonNights}): no paired verdict` };
  }
  const replicates = options.bootstrapReplicates ?? 1000;
  const seed = options.seed ?? 1;
  const replicatesA = bootstrapPooledMedian(pairing.groupedA, { replicates, seed });
  const replicatesB = bootstrapPooledMedian(pairing.groupedB, { replicates, seed });
  const differences = new Float64Array(replicates);
  for (let index = 0; index < replicates; index += 1) differences[index] = (replicatesA[index] ?? 0) - (replicatesB[index] ?? 0);
  differences.sort();
  const ci95: [number, number] = [percentileSorted(differences, 0.025), percentileSorted(differences, 0.975)];
  const wilcoxon = sortedDifferences.some((difference) => difference !== 0) ? wilcoxonSignedRank(sortedDifferences) : null;
  const verdict = ci95[1] < 0 ? 'a_sharper' : ci95[0] > 0 ? 'b_sharper' : 'no_clear_difference';
  return { ...base, ci95, wilcoxon, verdict, reason: null };
}
