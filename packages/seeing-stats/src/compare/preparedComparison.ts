import { SeeingInputError } from '../errors.js';
import { bootstrapPooledMedianPairSorted, bootstrapPooledMedianSorted } from '../stats/bootstrapPooledMedian.js';
import { mannWhitney } from '../stats/mannWhitney.js';
import { nightIntervalStatus, MINIMUM_NIGHTS_FOR_INTERVAL } from '../stats/nightIntervalStatus.js';
import { percentileSorted } from '../stats/percentile.js';
import { wilcoxonSignedRank } from '../stats/wilcoxonSignedRank.js';
import type { SiteComparison } from '../summary/compareSeeing.js';
import type { PairedComparison } from '../summary/comparePairedNights.js';
import { dayNumberLabel, nightDayNumber, solarOffsetMs } from '../summary/nightLabel.js';
import type { PairedNight } from '../summary/pairNights.js';
import type { SampleColumns, SortedSeeing } from '../summary/summarizeSeeing.js';

/** Seed offset of site B's stream in the unpaired comparison (as compareSeeing), so the sites' draws are independent. */
const SECOND_SITE_SEED_OFFSET = 0x9e3779b9;

/**
 * One site's samples arranged once for any number of pairwise comparisons: the seeing sort the caller holds
 * (a server keeps it per campaign), each sorted value's night, the nights' sizes and medians. Pairing and the
 * bootstraps then walk these arrays instead of regrouping and re-sorting the samples for every pair.
 */
export interface PreparedSite {
  timeMs: Float64Array;
  sorted: Float64Array;
  order: Uint32Array;
  /** Night day numbers (days since 1970-01-01, as nightDayNumber) of the nights with samples, ascending. */
  nightDays: Int32Array;
  /** Night slot (index into nightDays) of each sorted value. */
  nightOfSorted: Int32Array;
  nightSizes: Int32Array;
  /** Type-7 median of each night's samples. */
  nightlyMedians: Float64Array;
  /** Bootstrap replicate medians by seed, and the sorted 10-minute (or other) bins with samples, by bin width: computed once, on first use. */
  replicatesBySeed: Map<string, Float64Array>;
  binsByMinutes: Map<number, Float64Array>;
}

/**
 * Prepares a site's samples for comparePreparedPaired and comparePreparedUnpaired. `presorted` must be the stable
 * seeing sort (sortPositive) of columns.seeingArcsec, as for summarizeSeeingPresorted. O(n) after that sort.
 * Throws SeeingInputError for columns of unequal length or a sort of the wrong length.
 */
export function prepareSite(columns: SampleColumns, presorted: SortedSeeing, options: { longitudeDeg?: number } = {}): PreparedSite {
  const count = columns.seeingArcsec.length;
  if (columns.timeMs.length !== count) throw new SeeingInputError(`timeMs and seeingArcsec must have equal length, got ${columns.timeMs.length} and ${count}`);
  if (presorted.sorted.length !== count || presorted.order.length !== count) {
    throw new SeeingInputError(`presorted must sort all ${count} seeing values, got ${presorted.sorted.length}`);
  }
  const offsetMs = solarOffsetMs(options.longitudeDeg);
  const dayOf = new Int32Array(count);
  let firstDay = Number.POSITIVE_INFINITY;
  let lastDay = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < count; index += 1) {
    const day = nightDayNumber(columns.timeMs[index] ?? 0, offsetMs);
    dayOf[index] = day;
    if (day < firstDay) firstDay = day;
    if (day > lastDay) lastDay = day;
  }
  const span = count === 0 ? 0 : lastDay - firstDay + 1;
  const slotOfDay = new Int32Array(span).fill(-1);
  for (let index = 0; index < count; index += 1) slotOfDay[(dayOf[index] ?? 0) - firstDay] = 0;
  const days: number[] = [];
  for (let offset = 0; offset < span; offset += 1) {
    if (slotOfDay[offset] === 0) {
      slotOfDay[offset] = days.length;
      days.push(firstDay + offset);
    }
  }
  const nightOfSorted = new Int32Array(count);
  const nightSizes = new Int32Array(days.length);
  for (let position = 0; position < count; position += 1) {
    const slot = slotOfDay[(dayOf[presorted.order[position] ?? 0] ?? 0) - firstDay] ?? 0;
    nightOfSorted[position] = slot;
    nightSizes[slot] = (nightSizes[slot] ?? 0) + 1;
  }
  return {
    timeMs: columns.timeMs,
    sorted: presorted.sorted,
    order: presorted.order,
    nightDays: Int32Array.from(days),
    nightOfSorted,
    nightSizes,
    nightlyMedians: groupMedians(presorted.sorted, nightOfSorted, nightSizes),
    replicatesBySeed: new Map(),
    binsByMinutes: new Map(),
  };
}

/** Type-7 median of each group, from values sorted ascending tagged with their group (a stable scatter keeps each group sorted). */
function groupMedians(sorted: Float64Array, groupOf: Int32Array, groupSizes: Int32Array): Float64Array {
  const groupCount = groupSizes.length;
  const offsets = new Int32Array(groupCount + 1);
  for (let group = 0; group < groupCount; group += 1) offsets[group + 1] = (offsets[group] ?? 0) + (groupSizes[group] ?? 0);
  const cursor = offsets.slice(0, groupCount);
  const grouped = new Float64Array(sorted.length);
  for (let position = 0; position < sorted.length; position += 1) {
    const group = groupOf[position] ?? 0;
    const target = cursor[group] ?? 0;
    grouped[target] = sorted[position] ?? Number.NaN;
    cursor[group] = target + 1;
  }
  const medians = new Float64Array(groupCount);
  for (let group = 0; group < groupCount; group += 1) {
    medians[group] = (groupSizes[group] ?? 0) > 0 ? percentileSorted(grouped.subarray(offsets[group] ?? 0, offsets[group + 1] ?? 0), 0.5) : Number.NaN;
  }
  return medians;
}

/** The site's night-bootstrap replicate medians for a seed (bootstrapPooledMedianSorted), computed once. */
function replicatesOf(site: PreparedSite, replicates: number, seed: number): Float64Array {
  const key = `${replicates}:${seed}`;
  const cached = site.replicatesBySeed.get(key);
  if (cached) return cached;
  const computed = bootstrapPooledMedianSorted(site.sorted, site.nightOfSorted, site.nightSizes, { replicates, seed });
  site.replicatesBySeed.set(key, computed);
  return computed;
}

/**
 * compareSeeing on prepared sites: the same result (pooled medians, independent night bootstraps with seed and
 * seed + 0x9e3779b9, Mann–Whitney on the nightly medians), without regrouping or sorting; each site's replicates
 * are kept on it for its next pair. Needs samples at both sites; throws SeeingInputError otherwise.
 */
export function comparePreparedUnpaired(siteA: PreparedSite, siteB: PreparedSite, options: { bootstrapReplicates?: number; seed?: number } = {}): SiteComparison {
  if (siteA.sorted.length === 0 || siteB.sorted.length === 0) {
    throw new SeeingInputError(`compareSeeing needs samples at both sites, got ${siteA.sorted.length} and ${siteB.sorted.length}`);
  }
  const replicates = options.bootstrapReplicates ?? 1000;
  const seed = options.seed ?? 1;
  const replicatesA = replicatesOf(siteA, replicates, seed);
  const replicatesB = replicatesOf(siteB, replicates, seed + SECOND_SITE_SEED_OFFSET);
  const differences = new Float64Array(replicates);
  for (let index = 0; index < replicates; index += 1) differences[index] = (replicatesA[index] ?? 0) - (replicatesB[index] ?? 0);
  differences.sort();
  const test = mannWhitney(siteA.nightlyMedians, siteB.nightlyMedians);
  return {
    medianDifferenceArcsec: percentileSorted(siteA.sorted, 0.5) - percentileSorted(siteB.sorted, 0.5),
    ci95: [percentileSorted(differences, 0.025), percentileSorted(differences, 0.975)],
    mannWhitney: { u: test.u, z: test.z, pValue: test.pValue, nightsA: siteA.nightlyMedians.length, nightsB: siteB.nightlyMedians.length },
  };
}

/** Sorted distinct time bins (⌊time / bin⌋) in which the site has samples. */
function binsOf(site: PreparedSite, binMinutes: number): Float64Array {
  const cached = site.binsByMinutes.get(binMinutes);
  if (cached) return cached;
  const binMs = binMinutes * 60_000;
  const bins = Float64Array.from(site.timeMs, (time) => Math.floor(time / binMs)).sort();
  let distinct = 0;
  for (let index = 0; index < bins.length; index += 1) {
    if (index === 0 || bins[index] !== bins[distinct - 1]) {
      bins[distinct] = bins[index] ?? 0;
      distinct += 1;
    }
  }
  const result = bins.slice(0, distinct);
  site.binsByMinutes.set(binMinutes, result);
  return result;
}

/**
 * 1 for each sample (in the columns' order) whose time bin the other site has. Times come in ascending runs, so
 * one pointer walks the other site's sorted bins alongside; it is found again by bisection where a run starts over.
 */
function binFlags(site: PreparedSite, otherBins: Float64Array, binMs: number): Uint8Array {
  const flags = new Uint8Array(site.timeMs.length);
  let pointer = 0;
  let previousBin = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < site.timeMs.length; index += 1) {
    const bin = Math.floor((site.timeMs[index] ?? 0) / binMs);
    if (bin < previousBin) {
      let low = 0;
      let high = otherBins.length;
      while (low < high) {
        const middle = (low + high) >>> 1;
        if ((otherBins[middle] ?? 0) < bin) low = middle + 1;
        else high = middle;
      }
      pointer = low;
    }
    while (pointer < otherBins.length && (otherBins[pointer] ?? 0) < bin) pointer += 1;
    flags[index] = pointer < otherBins.length && otherBins[pointer] === bin ? 1 : 0;
    previousBin = bin;
  }
  return flags;
}

interface CommonSide {
  sorted: Float64Array;
  groupOf: Int32Array;
  groupSizes: Int32Array;
  medians: Float64Array;
}

/** The site's samples on the common nights (slot → common index, −1 for none), in sorted order, optionally only those whose time bin the other site has. */
function commonSide(site: PreparedSite, commonOfSlot: Int32Array, commonCount: number, otherBins: Float64Array | null, binMs: number): CommonSide {
  const flags = otherBins === null ? null : binFlags(site, otherBins, binMs);
  const total = site.sorted.length;
  const sorted = new Float64Array(total);
  const groupOf = new Int32Array(total);
  const groupSizes = new Int32Array(commonCount);
  let kept = 0;
  for (let position = 0; position < total; position += 1) {
    const common = commonOfSlot[site.nightOfSorted[position] ?? 0] ?? -1;
    if (common < 0) continue;
    if (flags !== null && flags[site.order[position] ?? 0] !== 1) continue;
    sorted[kept] = site.sorted[position] ?? Number.NaN;
    groupOf[kept] = common;
    groupSizes[common] = (groupSizes[common] ?? 0) + 1;
    kept += 1;
  }
  const keptSorted = sorted.slice(0, kept);
  const keptGroups = groupOf.slice(0, kept);
  return { sorted: keptSorted, groupOf: keptGroups, groupSizes, medians: groupMedians(keptSorted, keptGroups, groupSizes) };
}

/**
 * comparePairedNights on prepared sites: the same result (common nights, each site's pooled median on them, the
 * joint night-block bootstrap interval, the nightly differences, the Wilcoxon signed-rank test, the verdict; with
 * matchedBinMinutes only the samples in time bins both sites have), in time linear in the samples. Nights are
 * those of prepareSite (each site's own longitude). Below 10 common nights: no interval, test or verdict.
 */
export function comparePreparedPaired(
  siteA: PreparedSite,
  siteB: PreparedSite,
  options: { matchedBinMinutes?: number; bootstrapReplicates?: number; seed?: number } = {},
): PairedComparison {
  const binMinutes = options.matchedBinMinutes;
  if (binMinutes !== undefined && !(binMinutes > 0 && Number.isFinite(binMinutes))) {
    throw new SeeingInputError(`matchedBinMinutes must be a positive number of minutes, got ${String(binMinutes)}`);
  }
  const binMs = (binMinutes ?? 0) * 60_000;
  const binsA = binMinutes === undefined ? null : binsOf(siteA, binMinutes);
  const binsB = binMinutes === undefined ? null : binsOf(siteB, binMinutes);
  // Nights both sites have (before bin matching), in date order.
  const commonOfSlotA = new Int32Array(siteA.nightDays.length).fill(-1);
  const commonOfSlotB = new Int32Array(siteB.nightDays.length).fill(-1);
  const commonDays: number[] = [];
  for (let slotA = 0, slotB = 0; slotA < siteA.nightDays.length && slotB < siteB.nightDays.length; ) {
    const dayA = siteA.nightDays[slotA] ?? 0;
    const dayB = siteB.nightDays[slotB] ?? 0;
    if (dayA < dayB) slotA += 1;
    else if (dayB < dayA) slotB += 1;
    else {
      commonOfSlotA[slotA] = commonDays.length;
      commonOfSlotB[slotB] = commonDays.length;
      commonDays.push(dayA);
      slotA += 1;
      slotB += 1;
    }
  }
  let sideA = commonSide(siteA, commonOfSlotA, commonDays.length, binsB, binMs);
  let sideB = commonSide(siteB, commonOfSlotB, commonDays.length, binsA, binMs);
  // With bin matching a night can lose every sample at one site: it is then not a common night.
  const keep = commonDays.map((_, common) => (sideA.groupSizes[common] ?? 0) > 0 && (sideB.groupSizes[common] ?? 0) > 0);
  if (keep.some((kept) => !kept)) {
    const renumber = new Int32Array(commonDays.length).fill(-1);
    let next = 0;
    keep.forEach((kept, common) => {
      if (kept) renumber[common] = next++;
    });
    const remap = (side: CommonSide): CommonSide => {
      const keptPositions: number[] = [];
      side.groupOf.forEach((group, position) => {
        if ((renumber[group] ?? -1) >= 0) keptPositions.push(position);
      });
      const sorted = Float64Array.from(keptPositions, (position) => side.sorted[position] ?? Number.NaN);
      const groupOf = Int32Array.from(keptPositions, (position) => renumber[side.groupOf[position] ?? 0] ?? 0);
      const groupSizes = new Int32Array(next);
      groupOf.forEach((group) => (groupSizes[group] = (groupSizes[group] ?? 0) + 1));
      return { sorted, groupOf, groupSizes, medians: groupMedians(sorted, groupOf, groupSizes) };
    };
    sideA = remap(sideA);
    sideB = remap(sideB);
    for (let common = commonDays.length - 1; common >= 0; common -= 1) if (!keep[common]) commonDays.splice(common, 1);
  }
  const commonNights = commonDays.length;
  const nights: PairedNight[] = commonDays.map((day, common) => {
    const medianA = sideA.medians[common] ?? Number.NaN;
    const medianB = sideB.medians[common] ?? Number.NaN;
    return { night: dayNumberLabel(day), samplesA: sideA.groupSizes[common] ?? 0, samplesB: sideB.groupSizes[common] ?? 0, medianA, medianB, differenceArcsec: medianA - medianB };
  });
  const sortedDifferences = Float64Array.from(nights, (night) => night.differenceArcsec).sort();
  const differencePercentile = (fraction: number): number | null => (commonNights > 0 ? percentileSorted(sortedDifferences, fraction) : null);
  const medianA = sideA.sorted.length > 0 ? percentileSorted(sideA.sorted, 0.5) : null;
  const medianB = sideB.sorted.length > 0 ? percentileSorted(sideB.sorted, 0.5) : null;
  const base = {
    commonNights,
    matching: binMinutes === undefined ? ('nights' as const) : ('bins' as const),
    binMinutes: binMinutes ?? null,
    samplesA: sideA.sorted.length,
    samplesB: sideB.sorted.length,
    medianA,
    medianB,
    medianDifferenceArcsec: medianA === null || medianB === null ? null : medianA - medianB,
    interval: nightIntervalStatus(commonNights),
    nightlyDifferences: {
      nights,
      p10: differencePercentile(0.1),
      p25: differencePercentile(0.25),
      median: differencePercentile(0.5),
      p75: differencePercentile(0.75),
      p90: differencePercentile(0.9),
    },
  };
  if (commonNights < MINIMUM_NIGHTS_FOR_INTERVAL) {
    return { ...base, ci95: null, wilcoxon: null, verdict: null, reason: `fewer than ${MINIMUM_NIGHTS_FOR_INTERVAL} common nights (${commonNights}): no paired verdict` };
  }
  const replicates = options.bootstrapReplicates ?? 1000;
  const seed = options.seed ?? 1;
  // One seed for both sites and the same number of groups: each replicate draws the same nights at both (as
  // comparePairedNights), so the draws are made once for the two sides.
  const { a: replicatesA, b: replicatesB } = bootstrapPooledMedianPairSorted(sideA, sideB, { replicates, seed });
  const differences = new Float64Array(replicates);
  for (let index = 0; index < replicates; index += 1) differences[index] = (replicatesA[index] ?? 0) - (replicatesB[index] ?? 0);
  differences.sort();
  const ci95: [number, number] = [percentileSorted(differences, 0.025), percentileSorted(differences, 0.975)];
  const wilcoxon = sortedDifferences.some((difference) => difference !== 0) ? wilcoxonSignedRank(sortedDifferences) : null;
  const verdict = ci95[1] < 0 ? 'a_sharper' : ci95[0] > 0 ? 'b_sharper' : 'no_clear_difference';
  return { ...base, ci95, wilcoxon, verdict, reason: null };
}
