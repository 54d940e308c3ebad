import { SeeingInputError } from '../errors.js';
import { bootstrapPooledMedian } from '../stats/bootstrapPooledMedian.js';
import { mannWhitney } from '../stats/mannWhitney.js';
import { percentileSorted } from '../stats/percentile.js';
import { groupValues } from './groupValues.js';
import { nightDayNumber, solarOffsetMs } from './nightLabel.js';
import type { SampleColumns } from './summarizeSeeing.js';

export interface SiteComparison {
  /** Pooled median of A minus pooled median of B (arcsec; negative: A has the better seeing). */
  medianDifferenceArcsec: number;
  /** 95% interval of the difference from independent night bootstraps of A and B. */
  ci95: [number, number];
  /** Mann–Whitney test on the nightly medians of A and B. */
  mannWhitney: { u: number; z: number; pValue: number; nightsA: number; nightsB: number };
}

/**
 * Compares the seeing of two sites (each at zenith, 500 nm): the difference of pooled medians with a 95%
 * interval from bootstrapping whole nights of each site independently (percentile interval of the replicate
 * differences), and a Mann–Whitney test on nightly medians, since nights rather than samples are independent.
 * Needs at least one sample at each site. Throws SeeingInputError otherwise.
 */
export function compareSeeing(
  siteA: SampleColumns,
  siteB: SampleColumns,
  options: { longitudeDegA?: number; longitudeDegB?: number; bootstrapReplicates?: number; seed?: number } = {},
): SiteComparison {
  if (siteA.seeingArcsec.length === 0 || siteB.seeingArcsec.length === 0) {
    throw new SeeingInputError(`compareSeeing needs samples at both sites, got ${siteA.seeingArcsec.length} and ${siteB.seeingArcsec.length}`);
  }
  const replicates = options.bootstrapReplicates ?? 1000;
  const seed = options.seed ?? 1;
  const nightsA = groupByNight(siteA, options.longitudeDegA);
  const nightsB = groupByNight(siteB, options.longitudeDegB);
  const medianA = percentileSorted(Float64Array.from(siteA.seeingArcsec).sort(), 0.5);
  const medianB = percentileSorted(Float64Array.from(siteB.seeingArcsec).sort(), 0.5);
  // Different seeds for the two sites so their replicate streams are independent.
  const replicatesA = bootstrapPooledMedian(nightsA, { replicates, seed });
  const replicatesB = bootstrapPooledMedian(nightsB, { replicates, seed: seed + 0x9e3779b9 });
  const differences = new Float64Array(replicates);
  for (let index = 0; index < replicates; index += 1) differences[index] = (replicatesA[index] ?? 0) - (replicatesB[index] ?? 0);
  differences.sort();
  const nightlyA = nightlyMedians(nightsA);
  const nightlyB = nightlyMedians(nightsB);
  const test = mannWhitney(nightlyA, nightlyB);
  return {
    medianDifferenceArcsec: medianA - medianB,
    ci95: [percentileSorted(differences, 0.025), percentileSorted(differences, 0.975)],
    mannWhitney: { u: test.u, z: test.z, pValue: test.pValue, nightsA: nightlyA.length, nightsB: nightlyB.length },
  };
}

function groupByNight(columns: SampleColumns, longitudeDeg: number | undefined): ReturnType<typeof groupValues> {
  if (columns.timeMs.length !== columns.seeingArcsec.length) {
    throw new SeeingInputError(`timeMs and seeingArcsec must have equal length, got ${columns.timeMs.length} and ${columns.seeingArcsec.length}`);
  }
  const offsetMs = solarOffsetMs(longitudeDeg);
  const keys = new Int32Array(columns.timeMs.length);
  for (let index = 0; index < keys.length; index += 1) keys[index] = nightDayNumber(columns.timeMs[index] ?? 0, offsetMs);
  return groupValues(keys, columns.seeingArcsec);
}

function nightlyMedians(groups: ReturnType<typeof groupValues>): Float64Array {
  const medians = new Float64Array(groups.keys.length);
  for (let slot = 0; slot < groups.keys.length; slot += 1) {
    medians[slot] = percentileSorted(groups.values.subarray(groups.offsets[slot] ?? 0, groups.offsets[slot + 1] ?? 0), 0.5);
  }
  return medians;
}
