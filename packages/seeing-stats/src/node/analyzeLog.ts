import { createReadStream } from 'node:fs';
import { stat } from 'node:fs/promises';
import { LogFormatError } from '../errors.js';
import type { ColumnMapping, MappingOverrides } from '../log/logFields.js';
import { filterReason, DEFAULT_FILTERS, type FilterSettings } from '../log/filterReason.js';
import { validateFilters } from '../log/filterLimits.js';
import {
  chooseMeasure,
  defaultPlausibility,
  EXPOSURE_CORRECTION_METHOD,
  NOISE_SUBTRACTION_METHOD,
  noiseFields,
  interlacedFields,
  validatePlausibility,
  type ExposureCorrection,
  type FilterRejectReason,
  type MonitorSettings,
  type PlausibilityWindow,
  type RejectReason,
} from '../log/createRowReader.js';
import { readingWarnings, type ReadingWarning } from '../log/readingWarnings.js';
import type { SummaryWarning } from '../summary/summaryWarnings.js';
import type { SiteLocation } from '../log/sunAltitude.js';
import { RESPONSE_SET_NAMES } from '../physics/responseCoefficients.js';
import { nightIntervalStatus } from '../stats/nightIntervalStatus.js';
import { hemisphereSeasons } from '../summary/hemisphereSeasons.js';
import { MONTH_NAMES } from '../summary/seasonBalancedMedian.js';
import type { TimeFormat } from '../log/parseTimeAs.js';
import { INTERVAL_METHOD, SEASON_BALANCED_METHOD, SEASONS_METHOD, summarizeSeeing, type SeeingSummary, type SummaryOptions } from '../summary/summarizeSeeing.js';
import { tau0ToReference } from '../physics/tau0ToReference.js';
import { theta0ToReference } from '../physics/theta0ToReference.js';
import { checkLongitudeSign } from '../summary/checkLongitudeSign.js';
import { normalizeLongitudeDeg } from '../summary/nightLabel.js';
import { summaryWarnings, type SummaryContext } from '../summary/summaryWarnings.js';
import { GrowableColumns } from './growableColumns.js';
import { streamLog } from './streamLog.js';
import type { LayoutChoices } from '../log/delimiters.js';

export interface AnalyzeOptions extends LayoutChoices {
  /** How the time column is written (iso, jd, mjd, dmy, mdy); ISO 8601 by default. */
  timeFormat?: TimeFormat;
  /** The zone of times that carry none, minutes east of UTC. */
  utcOffsetMinutes?: number;
  /** Fields whose header a person named (null: not in the file); every other field is matched by name. */
  mapping?: MappingOverrides;
  monitor: MonitorSettings;
  site?: SiteLocation;
  filters?: Partial<FilterSettings>;
  /** Overrides of the engine's plausibility window (seeing 0.05″–10″, times 1990 to now + 1 day). */
  plausibility?: Partial<PlausibilityWindow>;
  summary?: SummaryOptions;
  /** False when the monitor's wavelength was not given but defaulted to 500 nm: a seeing or r0 log then gets a warning. Default true. */
  wavelengthGiven?: boolean;
}

export interface AnalyzerReport extends Omit<SeeingSummary, 'warnings'> {
  samples: {
    read: number;
    accepted: number;
    rejected: number;
    rejectedByReason: Record<string, number>;
    /**
     * Accepted samples whose longitudinal and transverse estimates disagree by more than the set ratio: 0 unless
     * the anisotropy filter is off (--keep-anisotropic), which keeps them flagged; otherwise they are counted in
     * rejectedByReason.anisotropic.
     */
    anisotropic: number;
    /** Accepted samples extrapolated to zero exposure from interlaced exposures (0 without 2x variance columns). */
    exposureCorrected: number;
    /** Accepted samples left uncorrected because ε(2τ) > ε(τ) on an axis (noise-dominated pair). */
    exposureNotCorrectedNoisy: number;
    firstTimeUtc: string | null;
    lastTimeUtc: string | null;
  };
  /** The first 100 rejected rows in line order. */
  rejectedRows: { line: number; reason: RejectReason; message: string }[];
  monitor: MonitorSettings & { responseName: string };
  method: SeeingSummary['method'] & { exposureCorrection: string; noiseSubtraction: string };
  filters: FilterSettings & { nightFilter: boolean };
  /** The plausibility window rows were checked against (times as ISO 8601 UTC). */
  plausibility: { minSeeingArcsec: number; maxSeeingArcsec: number; earliestTimeUtc: string; latestTimeUtc: string };
  /**
   * Warnings about the file (readingWarnings: lines not split, many rows unusable, no rows) first, then the
   * summary's own (summaryWarnings); each { code, message }.
   */
  warnings: (ReadingWarning | SummaryWarning)[];
  /** preambleLines: lines above the header line given (--header-line), skipped unread; 0 without it. */
  file: { headers: string[]; delimiter: string; mapping: ColumnMapping; rowsRead: number; linesTotal: number; preambleLines: number };
}

const MAX_LISTED_REJECTIONS = 100;
/** Accepted rows read before the file size is used to estimate how many will come. */
const ROWS_BEFORE_ESTIMATE = 8192;
/** Room for this much more than the estimate (rows later in a file may be a little shorter). */
const ESTIMATE_MARGIN = 1.03;
const FILTER_CODES: readonly FilterRejectReason[] = ['zenith_limit', 'sun_above_limit', 'low_flux', 'anisotropic'];
const DUPLICATE_CODE = 255;
/** GrowableColumns.exposure codes: index 0 = no interlaced columns. */
const EXPOSURE_CODES: readonly (ExposureCorrection | null)[] = [null, 'applied', 'not_applied_noisy'];

/**
 * Analyses one log end to end: streams it (file path or readable stream), rejects unreadable, empty and
 * non-physical rows, duplicate timestamps (a row whose time already appeared on an earlier readable row) and
 * rows failing the filters (zenith limit, sun altitude when a site is given, flux), each counted under its
 * reason, then summarises the accepted samples. When no sample is accepted the statistics are NaN (null in JSON).
 * Throws LogFormatError for a file that cannot be read at all, SeeingInputError for bad settings.
 */
export async function analyzeLog(input: NodeJS.ReadableStream | string, givenOptions: AnalyzeOptions): Promise<AnalyzerReport> {
  // One spelling of the site's meridian from here on (190° east is −170°), so every output shows the same one.
  const options: AnalyzeOptions =
    givenOptions.site === undefined ? givenOptions : { ...givenOptions, site: { ...givenOptions.site, longitudeDeg: normalizeLongitudeDeg(givenOptions.site.longitudeDeg) } };
  const filters: FilterSettings = { ...DEFAULT_FILTERS, ...options.filters };
  validateFilters(filters);
  const plausibility: PlausibilityWindow = { ...defaultPlausibility(), ...options.plausibility };
  validatePlausibility(plausibility);
  const stream = typeof input === 'string' ? await openLog(input) : input;
  const fileBytes = typeof input === 'string' ? await fileSize(input) : null;
  const kept = new GrowableColumns();
  // Once some rows are in, the file size tells about how many will come: room for them all in one step.
  let reserved = fileBytes === null;
  const reserveFromSize = (bytesRead: number): void => {
    if (reserved || fileBytes === null || kept.length < ROWS_BEFORE_ESTIMATE || bytesRead <= 0) return;
    reserved = true;
    kept.reserve(Math.ceil((kept.length * fileBytes * ESTIMATE_MARGIN) / bytesRead) + 1024);
  };
  const rejectedByReason: Record<string, number> = {};
  const listed: { line: number; reason: RejectReason; message: string }[] = [];
  let anisotropic = 0;
  const exposureCounts = [0, 0, 0];
  const countReject = (line: number, reason: RejectReason, message: string): void => {
    rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + 1;
    if (listed.length < MAX_LISTED_REJECTIONS) listed.push({ line, reason, message });
  };
  let timesAscending = true;
  let previousTimeMs = Number.NEGATIVE_INFINITY;

  const readOptions = {
    ...(options.timeFormat ? { timeFormat: options.timeFormat } : {}),
    ...(options.utcOffsetMinutes ? { utcOffsetMinutes: options.utcOffsetMinutes } : {}),
    ...(options.delimiter !== undefined ? { delimiter: options.delimiter } : {}),
    ...(options.headerLine !== undefined ? { headerLine: options.headerLine } : {}),
  };
  const file = await streamLog(stream, { mapping: options.mapping, monitor: options.monitor, site: options.site, plausibility, transientSamples: true, onProgress: reserveFromSize, ...readOptions }, {
    onSample(sample, line) {
      const reason = filterReason(sample, filters);
      if (sample.timeMs <= previousTimeMs) timesAscending = false;
      previousTimeMs = sample.timeMs;
      kept.push(sample.timeMs, sample.seeingArcsec, line, reason === null ? 0 : FILTER_CODES.indexOf(reason) + 1, sample.anisotropic, EXPOSURE_CODES.indexOf(sample.exposureCorrection));
      if (sample.tau0Ms !== null || sample.theta0Arcsec !== null) {
        // Reduced to zenith and 500 nm like the seeing; a value that is not positive is left out of the τ0/θ0 figures.
        const zenithDeg = Math.min(sample.zenithDeg, 89.999);
        kept.setTurbulence(
          sample.tau0Ms !== null && sample.tau0Ms > 0 ? tau0ToReference(sample.tau0Ms, zenithDeg, options.monitor.wavelengthNm) : null,
          sample.theta0Arcsec !== null && sample.theta0Arcsec > 0 ? theta0ToReference(sample.theta0Arcsec, zenithDeg, options.monitor.wavelengthNm) : null,
        );
      }
    },
    onReject(line, reason, message) {
      countReject(line, reason, message);
    },
  });

  markDuplicates(kept, timesAscending);
  // Before the accepted samples are compacted in place: the times the sun filter looked at, for the sign check.
  const longitudeSign = options.site === undefined ? undefined : checkLongitudeSign(kept.timeMs.subarray(0, kept.length), options.site, filters.sunMaxDeg);

  // Count filter and duplicate rejections, list them, and compact the accepted samples in place.
  const duplicateListing: { line: number; reason: RejectReason; message: string }[] = [];
  let accepted = 0;
  for (let index = 0; index < kept.length; index += 1) {
    const status = kept.statusAt(index);
    if (status === 0) {
      kept.timeMs[accepted] = kept.timeMs[index] ?? 0;
      kept.seeingArcsec[accepted] = kept.seeingArcsec[index] ?? 0;
      if (kept.tau0Ms !== null) kept.tau0Ms[accepted] = kept.tau0Ms[index] ?? Number.NaN;
      if (kept.theta0Arcsec !== null) kept.theta0Arcsec[accepted] = kept.theta0Arcsec[index] ?? Number.NaN;
      anisotropic += kept.anisotropicAt(index);
      const exposureCode = kept.exposureAt(index);
      exposureCounts[exposureCode] = (exposureCounts[exposureCode] ?? 0) + 1;
      accepted += 1;
      continue;
    }
    const reason: RejectReason = status === DUPLICATE_CODE ? 'duplicate_time' : (FILTER_CODES[status - 1] ?? 'zenith_limit');
    rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + 1;
    if (duplicateListing.length < MAX_LISTED_REJECTIONS) {
      duplicateListing.push({ line: kept.lineAt(index), reason, message: `${describeLateRejection(reason, kept.timeMs[index] ?? 0, filters)}` });
    }
  }
  kept.releaseFlags();
  const rejectedRows = [...listed, ...duplicateListing].sort((left, right) => left.line - right.line).slice(0, MAX_LISTED_REJECTIONS);
  const rejected = Object.values(rejectedByReason).reduce((sum, count) => sum + count, 0);

  const columns = {
    timeMs: kept.timeMs.subarray(0, accepted),
    seeingArcsec: kept.seeingArcsec.subarray(0, accepted),
    ...(kept.tau0Ms === null ? {} : { tau0Ms: kept.tau0Ms.subarray(0, accepted) }),
    ...(kept.theta0Arcsec === null ? {} : { theta0Arcsec: kept.theta0Arcsec.subarray(0, accepted) }),
  };
  const measure = chooseMeasure(file.mapping, options.monitor);
  const context: SummaryContext = {
    measurement: { measure: measure === 'seeing' || measure === 'r0' ? measure : 'variance', wavelengthGiven: options.wavelengthGiven ?? true },
    ...(longitudeSign === undefined ? {} : { longitudeSign }),
    ...options.summary?.context,
  };
  const summaryOptions: SummaryOptions = { longitudeDeg: options.site?.longitudeDeg, latitudeDeg: options.site?.latitudeDeg, ...options.summary, context };
  const summary = summarizeSeeing(columns, summaryOptions) ?? emptySummary(summaryOptions);
  let firstTimeMs = Number.POSITIVE_INFINITY;
  let lastTimeMs = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < accepted; index += 1) {
    const time = columns.timeMs[index] ?? 0;
    if (time < firstTimeMs) firstTimeMs = time;
    if (time > lastTimeMs) lastTimeMs = time;
  }

  return {
    samples: {
      read: file.rowsRead,
      accepted,
      rejected,
      rejectedByReason,
      anisotropic,
      exposureCorrected: exposureCounts[1] ?? 0,
      exposureNotCorrectedNoisy: exposureCounts[2] ?? 0,
      firstTimeUtc: accepted > 0 ? new Date(firstTimeMs).toISOString() : null,
      lastTimeUtc: accepted > 0 ? new Date(lastTimeMs).toISOString() : null,
    },
    ...summary,
    method: { ...summary.method, exposureCorrection: exposureMethod(file.mapping, options.monitor), noiseSubtraction: noiseMethod(file.mapping, options.monitor) },
    rejectedRows,
    monitor: { ...options.monitor, responseName: RESPONSE_SET_NAMES[options.monitor.response] },
    filters: { ...filters, nightFilter: options.site !== undefined },
    plausibility: {
      minSeeingArcsec: plausibility.minSeeingArcsec,
      maxSeeingArcsec: plausibility.maxSeeingArcsec,
      earliestTimeUtc: new Date(plausibility.earliestTimeMs).toISOString(),
      latestTimeUtc: new Date(plausibility.latestTimeMs).toISOString(),
    },
    warnings: [...readingWarnings({ read: file.rowsRead, rejectedByReason }), ...summary.warnings],
    file,
  };
}

/** Names the exposure-time rule when the reader used interlaced exposures, and says why not otherwise. */
function exposureMethod(mapping: ColumnMapping, monitor: MonitorSettings): string {
  // streamLog has already built a reader with this mapping, so chooseMeasure cannot throw here.
  if (interlacedFields(mapping, chooseMeasure(mapping, monitor)) !== null) return EXPOSURE_CORRECTION_METHOD;
  return 'not applied: the seeing is not read from variances with both var_…_2x_… columns (variances at twice the exposure time)';
}

/** Names the centroid-noise rule when the reader subtracted logged noise, and says why not otherwise. */
function noiseMethod(mapping: ColumnMapping, monitor: MonitorSettings): string {
  if (noiseFields(mapping, chooseMeasure(mapping, monitor)) !== null) return NOISE_SUBTRACTION_METHOD;
  return 'not applied: the seeing is not read from variances with both noise_… columns (centroid-noise variances)';
}

/** Marks every readable row whose time already appeared on an earlier readable row (status → duplicate). */
function markDuplicates(kept: GrowableColumns, timesAscending: boolean): void {
  if (timesAscending || kept.length < 2) return;
  const sortedTimes = kept.timeMs.slice(0, kept.length).sort();
  const repeated = new Set<number>();
  for (let index = 1; index < sortedTimes.length; index += 1) {
    if (sortedTimes[index] === sortedTimes[index - 1]) repeated.add(sortedTimes[index] ?? 0);
  }
  if (repeated.size === 0) return;
  const seen = new Set<number>();
  for (let index = 0; index < kept.length; index += 1) {
    const time = kept.timeMs[index] ?? 0;
    if (!repeated.has(time)) continue;
    if (seen.has(time)) kept.setStatus(index, DUPLICATE_CODE);
    else seen.add(time);
  }
}

function describeLateRejection(reason: RejectReason, timeMs: number, filters: FilterSettings): string {
  switch (reason) {
    case 'duplicate_time':
      return `time ${new Date(timeMs).toISOString()} already appeared on an earlier row`;
    case 'zenith_limit':
      return `zenith angle above the ${filters.maxZenithDeg}° limit`;
    case 'sun_above_limit':
      return `sun above ${filters.sunMaxDeg}° at the site`;
    case 'low_flux':
      return `flux below the minimum ${String(filters.minFlux)}`;
    case 'anisotropic':
      return 'longitudinal and transverse seeing disagree beyond the set ratio (anisotropic; keep such samples with --keep-anisotropic)';
    default:
      return reason;
  }
}

/** The size of the file in bytes, or null when it cannot be known (openLog reports why). */
async function fileSize(path: string): Promise<number | null> {
  try {
    const info = await stat(path);
    return info.isFile() ? info.size : null;
  } catch {
    return null;
  }
}

async function openLog(path: string): Promise<NodeJS.ReadableStream> {
  try {
    const info = await stat(path);
    if (info.isDirectory()) throw new LogFormatError(`${path} is a folder, not a log file.`, { hint: 'Give the path of one log file.' });
  } catch (error) {
    if (error instanceof LogFormatError) throw error;
    throw new LogFormatError(`Cannot open ${path}: ${error instanceof Error ? error.message : String(error)}`, {
      hint: 'Check the path and that the file is readable.',
    });
  }
  return createReadStream(path, { highWaterMark: 128 * 1024 });
}

function emptySummary(options: SummaryOptions): SeeingSummary {
  const none = Number.NaN;
  return {
    seeing: { unit: 'arcsec', wavelengthNm: 500, atZenith: true, mean: none, p10: none, p25: none, median: none, p75: none, p90: none, medianCi95: null },
    r0: { unit: 'cm', p10: none, p25: none, median: none, p75: none, p90: none },
    interval: nightIntervalStatus(0),
    seasonBalanced: { medianArcsec: none, monthsCovered: [], monthsMissing: [...MONTH_NAMES] },
    seasons: hemisphereSeasons().map((season) => ({ ...season, samples: 0, nights: 0, median: null, p25: null, p75: null })),
    nightlyMedians: { nights: 0, median: none, p25: none, p75: none },
    lognormal: { mu: none, sigma: none, median: none, ks: none },
    fractionBelow: {},
    fractionBelowCi95: {},
    tau0: null,
    theta0: null,
    warnings: summaryWarnings({ nights: 0, longitudeGiven: options.longitudeDeg !== undefined, context: options.context }),
    nights: 0,
    monthly: [],
    hourly: [],
    nightly: [],
    histogram: [],
    cdf: [],
    method: {
      seeingConstant: 0.98,
      percentile: 'linear (Hyndman-Fan type 7)',
      bootstrap: 'not run: no accepted samples',
      lognormal: 'not fitted: no accepted samples',
      fractionBelow: 'share of accepted samples with seeing strictly below the threshold',
      night: 'date of (local solar time − 12 h)',
      hourly: 'local solar hour 0..23, listed from noon through the night',
      seasonBalanced: SEASON_BALANCED_METHOD,
      seasons: SEASONS_METHOD,
      interval: INTERVAL_METHOD,
    },
  };
}
