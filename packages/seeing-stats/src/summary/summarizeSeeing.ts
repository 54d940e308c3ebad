import { SeeingInputError } from '../errors.js';
import { ARCSEC_PER_RADIAN, REFERENCE_WAVELENGTH_NM, SEEING_CONSTANT } from '../physics/constants.js';
import { bootstrapGroupFraction } from '../stats/bootstrapGroupFraction.js';
import { bootstrapPooledMedianSorted } from '../stats/bootstrapPooledMedian.js';
import { nightIntervalStatus, type NightIntervalStatus } from '../stats/nightIntervalStatus.js';
import { sortPositive } from '../stats/argsortPositive.js';
import { fitLogNormalToPositive } from '../stats/fitLogNormal.js';
import { ksDistanceLogNormalOfSortedPositive } from '../stats/ksDistanceLogNormal.js';
import { normalCdf } from '../stats/normalCdf.js';
import { percentileSorted } from '../stats/percentile.js';
import { RankCapture } from './groupPercentiles.js';
import { slotsOfKeys } from './groupValues.js';
import { hemisphereSeasons, seasonIndexOfMonth, type SeasonCode, type SeasonName } from './hemisphereSeasons.js';
import { seasonBalancedMedianSorted, type SeasonBalancedMedian } from './seasonBalancedMedian.js';
import { summarizeTurbulenceParameter, type TurbulenceParameterSummary } from './summarizeTurbulenceParameter.js';
import { summaryWarnings, type SummaryContext, type SummaryWarning } from './summaryWarnings.js';
import { dayNumberLabel, localSolarHour, nightDayNumber, solarOffsetMs } from './nightLabel.js';

/** Accepted samples only, equal length; seeing at zenith and 500 nm. */
export interface SampleColumns {
  timeMs: Float64Array;
  seeingArcsec: Float64Array;
  /** Optional coherence time τ0 per sample, reduced to zenith and 500 nm (tau0ToReference); NaN where not logged. */
  tau0Ms?: Float64Array;
  /** Optional isoplanatic angle θ0 per sample, reduced to zenith and 500 nm (theta0ToReference); NaN where not logged. */
  theta0Arcsec?: Float64Array;
}

export interface SummaryOptions {
  /** Site longitude (east positive): sets local solar time for nights and hours; UTC when absent. */
  longitudeDeg?: number;
  /** Thresholds for fractionBelow; default [0.6, 0.8, 1.0]. */
  thresholdsArcsec?: number[];
  /** Night-bootstrap replicates for medianCi95; default 1000. */
  bootstrapReplicates?: number;
  /** Seed of the bootstrap generator; default 1. */
  seed?: number;
  /** Number of log-spaced histogram bins; default 30. */
  histogramBins?: number;
  /** Site latitude: names the seasons for the hemisphere (DJF is summer in the south); unnamed when absent. */
  latitudeDeg?: number;
  /** What the caller knows about the samples (pooled response sets, monitor heights, …), for warnings[]. */
  context?: SummaryContext;
}

export interface SeasonStatistics {
  code: SeasonCode;
  /** Winter, spring, … in the site's hemisphere; null without a latitude. */
  name: SeasonName | null;
  months: [number, number, number];
  samples: number;
  nights: number;
  /** Type-7 percentiles of the season's samples; null when the season has none. */
  median: number | null;
  p25: number | null;
  p75: number | null;
}

export interface SeeingSummary {
  seeing: {
    unit: 'arcsec';
    wavelengthNm: 500;
    atZenith: true;
    mean: number;
    p10: number;
    p25: number;
    median: number;
    p75: number;
    p90: number;
    /** 95 % whole-night bootstrap interval of the median; null below 10 nights (interval.reason says why). */
    medianCi95: [number, number] | null;
  };
  /** Whether the 95 % intervals (medianCi95, fractionBelowCi95) are given, approximate (10–30 nights) or sound. */
  interval: NightIntervalStatus;
  /** Weighted median with every covered calendar month weighing the same, and the months not covered. */
  seasonBalanced: SeasonBalancedMedian;
  /** The four 3-month seasons (DJF, MAM, JJA, SON), named for the site's hemisphere. */
  seasons: SeasonStatistics[];
  /** Statistics over nights: type-7 median and quartiles of the per-night medians (each night counts once). */
  nightlyMedians: { nights: number; median: number; p25: number; p75: number };
  /** 95 % whole-night bootstrap interval of each fractionBelow; null below 10 nights. */
  fractionBelowCi95: Record<string, [number, number] | null>;
  /** Coherence time τ0 (ms) and isoplanatic angle θ0 (arcsec) at zenith and 500 nm, when the log carries them. */
  tau0: (TurbulenceParameterSummary & { unit: 'ms' }) | null;
  theta0: (TurbulenceParameterSummary & { unit: 'arcsec' }) | null;
  /** What could mislead a reader of these figures, each with a code and a sentence (empty when nothing). */
  warnings: SummaryWarning[];
  r0: { unit: 'cm'; p10: number; p25: number; median: number; p75: number; p90: number };
  lognormal: { mu: number; sigma: number; median: number; ks: number };
  fractionBelow: Record<string, number>;
  nights: number;
  monthly: { month: string; samples: number; median: number; p10: number; p25: number; p75: number; p90: number }[];
  hourly: { hour: number; samples: number; median: number }[];
  nightly: { night: string; samples: number; median: number }[];
  histogram: { lowArcsec: number; highArcsec: number; count: number; density: number; lognormalDensity: number }[];
  cdf: { seeingArcsec: number; fraction: number }[];
  method: {
    seeingConstant: 0.98;
    percentile: 'linear (Hyndman-Fan type 7)';
    bootstrap: string;
    lognormal: string;
    fractionBelow: string;
    night: string;
    hourly: string;
    seasonBalanced: string;
    seasons: string;
    interval: string;
  };
}

export const DEFAULT_THRESHOLDS_ARCSEC: readonly number[] = [0.6, 0.8, 1.0];
const DEFAULT_REPLICATES = 1000;
const DEFAULT_SEED = 1;
const DEFAULT_HISTOGRAM_BINS = 30;
const CDF_POINTS = 200;

/**
 * Statistics of accepted seeing samples (zenith, 500 nm): mean; type-7 percentiles 10/25/50/75/90 of seeing
 * and of r0 (r0 = 0.98 λ/ε per sample); a maximum-likelihood log-normal fit with its KS distance; the
 * fraction strictly below each threshold; monthly, hourly and nightly breakdowns; 95% intervals of the median and
 * of each fraction below from a bootstrap over whole nights (samples within a night are correlated), given from
 * 10 nights on and called approximate up to 30 (nightIntervalStatus); the season-balanced median
 * (seasonBalancedMedian), the four seasons of the site's hemisphere, the median and quartiles of the nightly
 * medians; τ0 and θ0 percentiles when the columns carry them; warnings[] (summaryWarnings); chart data.
 * Returns null for no samples.
 * Throws SeeingInputError when the columns differ in length or hold a value that is not a positive finite seeing.
 */
export function summarizeSeeing(columns: SampleColumns, options: SummaryOptions = {}): SeeingSummary | null {
  return summarize(columns, options, null);
}

/** The seeing column's stable ascending order and the values in that order (what sortPositive gives). */
export interface SortedSeeing {
  order: Uint32Array;
  sorted: Float64Array;
}

/**
 * summarizeSeeing for a caller that already holds the sort of the seeing column, e.g. a server that keeps each
 * campaign's sort order and picks a query's samples out of it: the same summary, without sorting again.
 * `presorted` must be exactly sortPositive(columns.seeingArcsec): order a permutation with sorted[i] =
 * seeingArcsec[order[i]], sorted ascending, equal values in index order. That is checked (one pass) and a
 * mismatch throws SeeingInputError, since a wrong order would give wrong statistics without any other sign.
 */
export function summarizeSeeingPresorted(columns: SampleColumns, presorted: SortedSeeing, options: SummaryOptions = {}): SeeingSummary | null {
  return summarize(columns, options, presorted);
}

function summarize(columns: SampleColumns, options: SummaryOptions, presorted: SortedSeeing | null): SeeingSummary | null {
  const { timeMs, seeingArcsec } = columns;
  const count = seeingArcsec.length;
  if (timeMs.length !== count) {
    throw new SeeingInputError(`timeMs and seeingArcsec must have equal length, got ${timeMs.length} and ${count}`);
  }
  if (count === 0) return null;
  const replicates = options.bootstrapReplicates ?? DEFAULT_REPLICATES;
  const seed = options.seed ?? DEFAULT_SEED;
  const thresholds = options.thresholdsArcsec ?? [...DEFAULT_THRESHOLDS_ARCSEC];
  const binCount = options.histogramBins ?? DEFAULT_HISTOGRAM_BINS;
  if (!Number.isInteger(binCount) || binCount < 1) throw new SeeingInputError(`histogramBins must be a positive whole number, got ${String(binCount)}`);
  for (const threshold of thresholds) {
    if (!(threshold > 0 && Number.isFinite(threshold))) throw new SeeingInputError(`thresholdsArcsec must hold positive numbers of arcseconds, got ${String(threshold)}`);
  }
  const offsetMs = solarOffsetMs(options.longitudeDeg);

  const sum = sumOfSeeing(seeingArcsec);
  if (presorted !== null) requireStableSort(seeingArcsec, presorted);
  const { order, sorted } = presorted ?? sortPositive(seeingArcsec);
  const quantile = (fraction: number): number => percentileSorted(sorted, fraction);
  // The logarithms where they are used (the fit's two passes, the few values the KS search looks at): a little more
  // work than one array of them, and 8 bytes a sample less memory.
  const fit = fitLogNormalToPositive(sorted);
  const ks = fit.sigma > 0 ? ksDistanceLogNormalOfSortedPositive(sorted, fit.mu, fit.sigma) : 1 - 1 / count;

  // One 4-byte column a sample holds, in turn, each night's key, its slot, its slot and hour, and the month of each
  // sorted position, each written over the one before where that is no longer read; the night of each sorted
  // position goes over the sort order (read at the same position just before), when the order is this function's
  // own. Instead of five new arrays.
  const column = new Int32Array(count);

  // Nights (integer day numbers) are the bootstrap block, give the nightly medians and the month a sample counts in.
  const { nightKeys, firstNight, lastNight } = nightsOf(timeMs, offsetMs, column);
  const { slotKeys: nightDays, slotOf: nightSlotOf } = slotsOfKeys(nightKeys, firstNight, lastNight, column);
  const nightCount = nightDays.length;
  const nightLabels = nightDays.map(dayNumberLabel);

  // Nights ascend, so their months do too: month index of each night slot, from its 'YYYY-MM'.
  const monthLabels: string[] = [];
  const monthOfNight = new Int32Array(nightCount);
  nightLabels.forEach((label, slot) => {
    const month = label.slice(0, 7);
    if (monthLabels[monthLabels.length - 1] !== month) monthLabels.push(month);
    monthOfNight[slot] = monthLabels.length - 1;
  });

  // One pass through the sort order tags each sorted position with its night (the bootstrap needs that) and feeds
  // every value to its night's, month's and hour's percentile capture: values come ascending, so each group's
  // order statistics are found without regrouping or sorting any group.
  const { nightAndHourOf, nightSizes, hourSizes } = packNightAndHour(nightSlotOf, timeMs, offsetMs, nightCount, column);
  const monthSizes = new Int32Array(monthLabels.length);
  nightSizes.forEach((size, slot) => (monthSizes[monthOfNight[slot] ?? 0] = (monthSizes[monthOfNight[slot] ?? 0] ?? 0) + size));
  const monthFractions = [0.5, 0.1, 0.25, 0.75, 0.9];
  const nightCapture = new RankCapture(nightSizes, [0.5]);
  const monthCapture = new RankCapture(monthSizes, monthFractions);
  const hourCapture = new RankCapture(hourSizes, [0.5]);
  const nightOfSorted = tagSortedPositions(
    order,
    sorted,
    nightAndHourOf,
    monthOfNight,
    nightCapture,
    monthCapture,
    hourCapture,
    presorted === null ? new Int32Array(order.buffer, order.byteOffset, count) : new Int32Array(count),
  );

  const nightMedians = nightCapture.percentiles();
  const nightly = nightLabels.map((night, slot) => ({ night, samples: nightSizes[slot] ?? 0, median: nightMedians[slot] ?? Number.NaN }));

  const monthPercentiles = monthCapture.percentiles();
  const monthly = monthLabels.map((month, slot) => {
    const at = (column: number): number => monthPercentiles[slot * monthFractions.length + column] ?? Number.NaN;
    return { month, samples: monthSizes[slot] ?? 0, median: at(0), p10: at(1), p25: at(2), p75: at(3), p90: at(4) };
  });

  const hourMedians = hourCapture.percentiles();
  const hourly: SeeingSummary['hourly'] = [];
  for (let hour = 0; hour < 24; hour += 1) {
    const samples = hourSizes[hour] ?? 0;
    if (samples > 0) hourly.push({ hour, samples, median: hourMedians[hour] ?? Number.NaN });
  }
  // Ordered through the night (from local noon), so an evening-to-morning chart reads left to right.
  hourly.sort((left, right) => ((left.hour + 12) % 24) - ((right.hour + 12) % 24));

  // Intervals only from 10 nights on: below that the nominal 95 % covers far less (nightIntervalStatus).
  const interval = nightIntervalStatus(nightCount);
  const withInterval = interval.status !== 'too_few_nights';
  let medianCi95: [number, number] | null = null;
  if (withInterval) {
    const replicateMedians = bootstrapPooledMedianSorted(sorted, nightOfSorted, nightSizes, { replicates, seed }).sort();
    medianCi95 = [percentileSorted(replicateMedians, 0.025), percentileSorted(replicateMedians, 0.975)];
  }

  const fractionBelow: Record<string, number> = {};
  const fractionBelowCi95: Record<string, [number, number] | null> = {};
  thresholds.forEach((threshold, index) => {
    const below = lowerBound(sorted, threshold);
    const key = thresholdKey(threshold);
    fractionBelow[key] = below / count;
    fractionBelowCi95[key] = null;
    if (withInterval) {
      // Its own replicate stream per threshold (seed + index + 1), so adding a threshold leaves the others as they were.
      const replicateFractions = bootstrapGroupFraction(countBelowByNight(nightOfSorted, below, nightCount), nightSizes, { replicates, seed: seed + index + 1 }).sort();
      fractionBelowCi95[key] = [percentileSorted(replicateFractions, 0.025), percentileSorted(replicateFractions, 0.975)];
    }
  });

  // Calendar month (1–12) and season of each night, then of each sorted value, for the season figures.
  const seasonList = hemisphereSeasons(options.latitudeDeg);
  const monthOfYearOfNight = Int32Array.from(nightLabels, (label) => Number(label.slice(5, 7)));
  const seasonOfNight = Int32Array.from(monthOfYearOfNight, (month) => seasonIndexOfMonth(month));
  const seasonNights = new Int32Array(4);
  const seasonSizes = new Int32Array(4);
  seasonOfNight.forEach((season, slot) => {
    seasonNights[season] = (seasonNights[season] ?? 0) + 1;
    seasonSizes[season] = (seasonSizes[season] ?? 0) + (nightSizes[slot] ?? 0);
  });
  const seasonCapture = new RankCapture(seasonSizes, [0.5, 0.25, 0.75]);
  const monthOfSorted = tagMonthsAndSeasons(sorted, nightOfSorted, monthOfYearOfNight, seasonOfNight, seasonCapture, column);
  const seasonPercentiles = seasonCapture.percentiles();
  const seasons: SeasonStatistics[] = seasonList.map((season, index) => {
    const has = (seasonSizes[index] ?? 0) > 0;
    const at = (column: number): number | null => (has ? (seasonPercentiles[index * 3 + column] ?? null) : null);
    return { code: season.code, name: season.name, months: season.months, samples: seasonSizes[index] ?? 0, nights: seasonNights[index] ?? 0, median: at(0), p25: at(1), p75: at(2) };
  });
  const seasonBalanced = seasonBalancedMedianSorted(sorted, monthOfSorted);

  const sortedNightMedians = Float64Array.from(nightMedians).sort();
  const nightlyMedians = {
    nights: nightCount,
    median: percentileSorted(sortedNightMedians, 0.5),
    p25: percentileSorted(sortedNightMedians, 0.25),
    p75: percentileSorted(sortedNightMedians, 0.75),
  };
  const turbulenceOptions = { longitudeDeg: options.longitudeDeg, latitudeDeg: options.latitudeDeg };
  const tau0 = columns.tau0Ms === undefined ? null : summarizeTurbulenceParameter(timeMs, requireLength(columns.tau0Ms, count, 'tau0Ms'), turbulenceOptions);
  const theta0 = columns.theta0Arcsec === undefined ? null : summarizeTurbulenceParameter(timeMs, requireLength(columns.theta0Arcsec, count, 'theta0Arcsec'), turbulenceOptions);

  // r0 = 0.98 λ/ε per sample is decreasing in ε, so r0's ascending order is seeing's descending order.
  const r0ScaleCmArcsec = ((SEEING_CONSTANT * REFERENCE_WAVELENGTH_NM * 1e-9) * ARCSEC_PER_RADIAN) * 100;
  const r0Quantile = (fraction: number): number => {
    // Type-7 interpolation on the r0 order statistics r0[i] = scale / seeing[n − 1 − i].
    const position = (count - 1) * fraction;
    const lowIndex = Math.floor(position);
    const low = r0ScaleCmArcsec / (sorted[count - 1 - lowIndex] ?? Number.NaN);
    if (lowIndex + 1 >= count) return low;
    const high = r0ScaleCmArcsec / (sorted[count - 2 - lowIndex] ?? Number.NaN);
    return low + (position - lowIndex) * (high - low);
  };

  return {
    seeing: {
      unit: 'arcsec',
      wavelengthNm: 500,
      atZenith: true,
      mean: sum / count,
      p10: quantile(0.1),
      p25: quantile(0.25),
      median: quantile(0.5),
      p75: quantile(0.75),
      p90: quantile(0.9),
      medianCi95,
    },
    r0: { unit: 'cm', p10: r0Quantile(0.1), p25: r0Quantile(0.25), median: r0Quantile(0.5), p75: r0Quantile(0.75), p90: r0Quantile(0.9) },
    interval,
    seasonBalanced,
    seasons,
    nightlyMedians,
    lognormal: { mu: fit.mu, sigma: fit.sigma, median: fit.median, ks },
    fractionBelow,
    fractionBelowCi95,
    tau0: tau0 === null ? null : { unit: 'ms', ...tau0 },
    theta0: theta0 === null ? null : { unit: 'arcsec', ...theta0 },
    warnings: summaryWarnings({ nights: nightCount, longitudeGiven: options.longitudeDeg !== undefined, context: options.context }),
    nights: nightCount,
    monthly,
    hourly,
    nightly,
    histogram: logHistogram(sorted, binCount, fit.mu, fit.sigma),
    cdf: cdfPoints(sorted),
    method: {
      seeingConstant: 0.98,
      percentile: 'linear (Hyndman-Fan type 7)',
      bootstrap: withInterval
        ? `whole nights resampled with replacement, ${replicates} replicates, seed ${seed}, 2.5–97.5% percentile interval of the pooled median and of each fraction below a threshold`
        : `not run: ${interval.reason ?? 'too few nights'}`,
      lognormal: 'maximum likelihood on ln(seeing), sigma with divisor n; ks = Kolmogorov–Smirnov distance to the fit',
      fractionBelow: 'share of accepted samples with seeing strictly below the threshold',
      night: `date of (local solar time − 12 h), local solar time = UTC + longitude/15 h (${options.longitudeDeg === undefined ? 'no longitude given: UTC' : `longitude ${options.longitudeDeg}°`})`,
      hourly: 'local solar hour 0..23, listed from noon through the night',
      seasonBalanced: SEASON_BALANCED_METHOD,
      seasons: SEASONS_METHOD,
      interval: INTERVAL_METHOD,
    },
  };
}

/** Method notes shared with callers that build an empty summary. */
export const SEASON_BALANCED_METHOD = 'weighted median of all samples, each weighted by 1 / (samples in its calendar month, all years together, by night date), so every covered calendar month weighs the same';
export const SEASONS_METHOD = 'meteorological 3-month seasons DJF, MAM, JJA, SON by night date, named for the hemisphere of the site latitude (unnamed without one)';
export const INTERVAL_METHOD = 'no 95 % interval below 10 nights; 10–30 nights: approximate (coverage of the whole-night bootstrap measured by simulation, see the README)';

/** Throws unless an optional column has one value per sample. */
function requireLength(column: Float64Array, count: number, name: string): Float64Array {
  if (column.length !== count) throw new SeeingInputError(`${name} must have one value per sample (${count}), got ${column.length}`);
  return column;
}

/** Per night slot, how many of its values sit at sorted positions below `below` (i.e. are below the threshold). */
function countBelowByNight(nightOfSorted: Int32Array, below: number, nightCount: number): Int32Array {
  const counts = new Int32Array(nightCount);
  for (let position = 0; position < below; position += 1) {
    const night = nightOfSorted[position] ?? 0;
    counts[night] = (counts[night] ?? 0) + 1;
  }
  return counts;
}

/** The calendar month of each sorted value; feeds each value to its season's percentile capture on the way. */
function tagMonthsAndSeasons(sorted: Float64Array, nightOfSorted: Int32Array, monthOfNight: Int32Array, seasonOfNight: Int32Array, seasonCapture: RankCapture, into: Int32Array): Int32Array {
  const monthOfSorted = into;
  for (let position = 0; position < sorted.length; position += 1) {
    const night = nightOfSorted[position] ?? 0;
    monthOfSorted[position] = monthOfNight[night] ?? 1;
    seasonCapture.take(seasonOfNight[night] ?? 0, sorted[position] ?? Number.NaN);
  }
  return monthOfSorted;
}

/** "0.6", "0.8", "1.0": one decimal at least, so the keys match the documented JSON. */
export function thresholdKey(thresholdArcsec: number): string {
  return Number.isInteger(thresholdArcsec) ? thresholdArcsec.toFixed(1) : String(thresholdArcsec);
}

/** First index whose value is ≥ threshold, i.e. how many values are strictly below it. */
function lowerBound(sorted: Float64Array, threshold: number): number {
  let low = 0;
  let high = sorted.length;
  while (low < high) {
    const middle = (low + high) >>> 1;
    if ((sorted[middle] ?? 0) < threshold) low = middle + 1;
    else high = middle;
  }
  return low;
}

function logHistogram(sorted: Float64Array, binCount: number, mu: number, sigma: number): SeeingSummary['histogram'] {
  const count = sorted.length;
  const smallest = sorted[0] ?? 1;
  const largest = sorted[count - 1] ?? 1;
  // Widen a degenerate range so every bin has width; edges are log-spaced because seeing is right-skewed.
  const lowEdgeLog = Math.log(smallest) - (largest === smallest ? 0.05 : 0);
  const highEdgeLog = Math.log(largest) + (largest === smallest ? 0.05 : 1e-12);
  const stepLog = (highEdgeLog - lowEdgeLog) / binCount;
  const bins: SeeingSummary['histogram'] = [];
  let cursor = 0;
  for (let bin = 0; bin < binCount; bin += 1) {
    const lowArcsec = Math.exp(lowEdgeLog + bin * stepLog);
    const highArcsec = bin === binCount - 1 ? Math.exp(highEdgeLog) : Math.exp(lowEdgeLog + (bin + 1) * stepLog);
    const start = cursor;
    while (cursor < count && ((sorted[cursor] ?? 0) < highArcsec || bin === binCount - 1)) cursor += 1;
    const binSamples = cursor - start;
    const width = highArcsec - lowArcsec;
    const modelShare = sigma > 0 ? normalCdf((Math.log(highArcsec) - mu) / sigma) - normalCdf((Math.log(lowArcsec) - mu) / sigma) : 0;
    bins.push({ lowArcsec, highArcsec, count: binSamples, density: binSamples / count / width, lognormalDensity: modelShare / width });
  }
  return bins;
}

function cdfPoints(sorted: Float64Array): SeeingSummary['cdf'] {
  const count = sorted.length;
  const points: SeeingSummary['cdf'] = [];
  const step = Math.max(1, Math.ceil(count / CDF_POINTS));
  for (let index = 0; index < count; index += step) points.push({ seeingArcsec: sorted[index] ?? 0, fraction: (index + 1) / count });
  const last = points[points.length - 1];
  if (last !== undefined && last.fraction < 1) points.push({ seeingArcsec: sorted[count - 1] ?? 0, fraction: 1 });
  return points;
}

// Each per-sample loop below is a small function of its own: the engine optimises a small function whole, while a
// long function with many loops is compiled mid-loop and thrown back at the next loop it has not yet seen run.

/** Σ seeing in input order, checking every value is a positive finite number of arcseconds. */
function sumOfSeeing(seeingArcsec: Float64Array): number {
  let sum = 0;
  for (let index = 0; index < seeingArcsec.length; index += 1) {
    const value = seeingArcsec[index] ?? Number.NaN;
    if (!(value > 0 && value < Number.POSITIVE_INFINITY)) {
      throw new SeeingInputError(`seeingArcsec must hold positive finite arcseconds, got ${String(value)} at index ${index}`);
    }
    sum += value;
  }
  return sum;
}

/** Night day number of every sample (written into `into`), and the first and last night. */
function nightsOf(timeMs: Float64Array, offsetMs: number, into: Int32Array): { nightKeys: Int32Array; firstNight: number; lastNight: number } {
  const count = timeMs.length;
  const nightKeys = into;
  let firstNight = Number.POSITIVE_INFINITY;
  let lastNight = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < count; index += 1) {
    const night = nightDayNumber(timeMs[index] ?? 0, offsetMs);
    nightKeys[index] = night;
    if (night < firstNight) firstNight = night;
    if (night > lastNight) lastNight = night;
  }
  return { nightKeys, firstNight, lastNight };
}

/**
 * Night slot and local solar hour in one word per sample (slot · 32 + hour), written into `into`, so the pass through
 * the sort order gathers once; and the sizes of the nights and hours.
 */
function packNightAndHour(
  nightSlotOf: Int32Array,
  timeMs: Float64Array,
  offsetMs: number,
  nightCount: number,
  into: Int32Array,
): { nightAndHourOf: Int32Array; nightSizes: Int32Array; hourSizes: Int32Array } {
  const nightAndHourOf = into;
  const nightSizes = new Int32Array(nightCount);
  const hourSizes = new Int32Array(24);
  for (let index = 0; index < nightAndHourOf.length; index += 1) {
    const night = nightSlotOf[index] ?? 0;
    const hour = localSolarHour(timeMs[index] ?? 0, offsetMs);
    nightAndHourOf[index] = (night << 5) | hour;
    nightSizes[night] = (nightSizes[night] ?? 0) + 1;
    hourSizes[hour] = (hourSizes[hour] ?? 0) + 1;
  }
  return { nightAndHourOf, nightSizes, hourSizes };
}

/** The night of every sorted position; feeds each value to the captures of its night, month and hour on the way. */
function tagSortedPositions(
  order: Uint32Array,
  sorted: Float64Array,
  nightAndHourOf: Int32Array,
  monthOfNight: Int32Array,
  nightCapture: RankCapture,
  monthCapture: RankCapture,
  hourCapture: RankCapture,
  into: Int32Array,
): Int32Array {
  const count = order.length;
  const nightOfSorted = into;
  for (let position = 0; position < count; position += 1) {
    const nightAndHour = nightAndHourOf[order[position] ?? 0] ?? 0;
    const night = nightAndHour >>> 5;
    const value = sorted[position] ?? Number.NaN;
    nightOfSorted[position] = night;
    nightCapture.take(night, value);
    monthCapture.take(monthOfNight[night] ?? 0, value);
    hourCapture.take(nightAndHour & 31, value);
  }
  return nightOfSorted;
}

/** Checks presorted is the stable ascending sort of values (see summarizeSeeingPresorted). */
function requireStableSort(values: Float64Array, presorted: SortedSeeing): void {
  const { order, sorted } = presorted;
  const count = values.length;
  if (order.length !== count || sorted.length !== count) {
    throw new SeeingInputError(`presorted must cover every sample, got ${order.length} indices and ${sorted.length} sorted values for ${count} samples`);
  }
  // Values matching through the order, ascending, with equal values in strictly increasing index order, make the
  // order a permutation (a repeated index would repeat its value inside one run of equal values) and the stable sort.
  for (let position = 0; position < count; position += 1) {
    const index = order[position] ?? count;
    const value = sorted[position] ?? Number.NaN;
    const previous = position > 0 ? (sorted[position - 1] ?? Number.NaN) : Number.NEGATIVE_INFINITY;
    const inOrder = previous < value || (previous === value && (order[position - 1] ?? count) < index);
    if (index >= count || values[index] !== value || !inOrder) {
      throw new SeeingInputError(`presorted is not the stable ascending sort of seeingArcsec (first wrong at sorted position ${position})`);
    }
  }
}
