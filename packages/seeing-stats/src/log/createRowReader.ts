import { LogFormatError, SeeingInputError, requirePositive } from '../errors.js';
import { ARCSEC_PER_RADIAN, DEG_TO_RAD, REFERENCE_WAVELENGTH_NM, SEEING_CONSTANT } from '../physics/constants.js';
import { exposureTimeCorrection } from '../physics/exposureTimeCorrection.js';
import { responseCoefficients, type ResponseSet } from '../physics/responseCoefficients.js';
import { checkMapping } from './checkMapping.js';
import type { ColumnMapping, LogField } from './logFields.js';
import { parseTimeAs, timeFormatExample, type TimeFormat } from './parseTimeAs.js';
import type { LineRejectReason } from './splitLog.js';
import { createSunAltitude, type SiteLocation } from './sunAltitude.js';

export interface MonitorSettings {
  /** Sub-aperture diameter D (needed for variance inputs). */
  apertureMm?: number;
  /** Distance B between sub-aperture centres (needed for variance inputs). */
  baselineMm?: number;
  /** Wavelength the monitor measured at; the log's seeing/r0/variances refer to it. */
  wavelengthNm: number;
  /** Plate scale, for variances logged in pixel². */
  pixelScaleArcsec?: number;
  /** Exposure time per frame, recorded with the results. */
  exposureMs?: number;
  response: ResponseSet;
  /** A variance sample is flagged anisotropic when its two seeing estimates differ by more than this ratio; default 1.3. */
  anisotropyRatioLimit?: number;
}

/** Reasons decided while reading a row (line reasons first, then the row reader's own, in the order checked). */
export type RowRejectReason =
  | LineRejectReason
  | 'unreadable_time'
  | 'implausible_time'
  | 'missing_value'
  | 'non_decimal_number'
  | 'non_physical'
  | 'noise_dominated'
  | 'exposure_correction_too_large'
  | 'implausible_seeing';
export type FilterRejectReason = 'zenith_limit' | 'sun_above_limit' | 'low_flux' | 'anisotropic';
export type RejectReason = RowRejectReason | FilterRejectReason | 'duplicate_time' | 'excluded_window';

export interface LogSample {
  timeMs: number;
  /** Zenith, 500 nm; the mean of the longitudinal and transverse estimates when variances are given. */
  seeingArcsec: number;
  /** Zenith, 500 nm: 0.98 λ / seeingArcsec. */
  r0Cm: number;
  zenithDeg: number;
  seeingLongArcsec: number | null;
  seeingTransArcsec: number | null;
  anisotropic: boolean;
  /**
   * Exposure-time correction from interlaced exposures (variances at τ and 2τ mapped): 'applied' when the sample
   * was extrapolated to zero exposure, 'not_applied_noisy' when on some axis the 2τ variance exceeded the τ one
   * (noise-dominated pair, kept uncorrected), null when the log gives no variances at twice the exposure time.
   */
  exposureCorrection: ExposureCorrection | null;
  sunAltDeg: number | null;
  flux: number | null;
  scintIndex: number | null;
  tau0Ms: number | null;
  theta0Arcsec: number | null;
  windMs: number | null;
  rhPct: number | null;
}

export type ExposureCorrection = 'applied' | 'not_applied_noisy';

export type RowResult = { ok: true; sample: LogSample } | { ok: false; reason: RowRejectReason; message: string };

/**
 * The largest factor the exposure-time correction may raise an axis's seeing by: ε0/ε(τ) = (ε(τ)/ε(2τ))^0.75 ≤ 1.5,
 * i.e. ε(τ)/ε(2τ) ≤ 1.5^(4/3) = 1.717. Calmcrest's choice, common practice with no published source: at the
 * 5–10 ms exposures of seeing monitors the correction is some per cent to a few tens of per cent, so a pair
 * asking for more than +50 % did not see the same turbulence (a cloud, a star lost in one exposure) and its
 * extrapolation would be noise. Such samples are rejected as `exposure_correction_too_large`.
 */
export const MAX_EXPOSURE_CORRECTION_FACTOR = 1.5;

/**
 * The largest share of a measured variance that centroid noise may make up: 2σc²/σ²_measured ≤ 0.2 on each
 * axis, else the sample is `noise_dominated` (seeing-physics.md §6.3, a recommendation from memory; a noise term
 * that large leaves little signal, and one at or above the measured variance cannot be subtracted at all, §3.2).
 */
export const MAX_NOISE_SHARE = 0.2;

/** The modified-exponential rule the row reader applies, named in outputs. */
export const EXPOSURE_CORRECTION_METHOD = `ε0 = ε(τ)^1.75 ε(2τ)^(-0.75) per axis from interlaced exposures (Tokovinin 2002 modified exponential; exponents from memory); samples with ε(2τ) > ε(τ) on an axis are kept uncorrected as noise-dominated; a correction above ×${MAX_EXPOSURE_CORRECTION_FACTOR} on an axis (Calmcrest's cap, no published source) rejects the sample as exposure_correction_too_large`;

/** The centroid-noise rule the row reader applies, named in outputs. */
export const NOISE_SUBTRACTION_METHOD = `σ²_atm = σ²_measured − 2σc² per axis before the reduction, σc² being the logged one-image centroid-noise variance (seeing-physics.md §3.2, rule from memory); samples with 2σc² > ${MAX_NOISE_SHARE} σ²_measured on an axis are rejected as noise_dominated; variances at twice the exposure time are used as logged`;

/** Which input a reader turns into seeing; variances win when the monitor geometry is known. */
export type MeasureSource = 'variance_arcsec2' | 'variance_px2' | 'seeing' | 'r0';

export const DEFAULT_ANISOTROPY_RATIO_LIMIT = 1.3;

/**
 * Which readings can be real. Seeing (at zenith and 500 nm, after every correction) outside
 * [minSeeingArcsec, maxSeeingArcsec] is `implausible_seeing`: a unit mistake or a diverging fit, not weather
 * (common practice: recorded site seeing stays within a few hundredths of an arcsecond to a few arcseconds).
 * Sample times outside [earliestTimeMs, latestTimeMs] are `implausible_time` (a clock reset to year 0000, a
 * typo'd 9999).
 */
export interface PlausibilityWindow {
  minSeeingArcsec: number;
  maxSeeingArcsec: number;
  earliestTimeMs: number;
  /** Default: one day after the reader was built (a monitor clock slightly ahead is not yet wrong). */
  latestTimeMs: number;
}

/** 1990-01-01T00:00:00Z: before any digital seeing-monitor log Calmcrest would read. */
export const EARLIEST_PLAUSIBLE_TIME_MS = Date.UTC(1990, 0, 1);
/** How far after now a sample time may lie: one day, in milliseconds. */
export const LATEST_PLAUSIBLE_AHEAD_MS = 86_400_000;
export const DEFAULT_MIN_SEEING_ARCSEC = 0.05;
export const DEFAULT_MAX_SEEING_ARCSEC = 10;

/** The default plausibility window as of `nowMs`: seeing 0.05″–10″, times 1990-01-01 to now + 1 day. */
export function defaultPlausibility(nowMs: number = Date.now()): PlausibilityWindow {
  return {
    minSeeingArcsec: DEFAULT_MIN_SEEING_ARCSEC,
    maxSeeingArcsec: DEFAULT_MAX_SEEING_ARCSEC,
    earliestTimeMs: EARLIEST_PLAUSIBLE_TIME_MS,
    latestTimeMs: nowMs + LATEST_PLAUSIBLE_AHEAD_MS,
  };
}

/** Throws SeeingInputError unless the window is a usable range. */
export function validatePlausibility(window: PlausibilityWindow): void {
  requirePositive(window.minSeeingArcsec, 'minSeeingArcsec', 'arcseconds');
  requirePositive(window.maxSeeingArcsec, 'maxSeeingArcsec', 'arcseconds');
  if (!(window.maxSeeingArcsec > window.minSeeingArcsec)) {
    throw new SeeingInputError(`maxSeeingArcsec must be above minSeeingArcsec, got ${String(window.minSeeingArcsec)}″ to ${String(window.maxSeeingArcsec)}″`);
  }
  if (!Number.isFinite(window.earliestTimeMs) || !Number.isFinite(window.latestTimeMs) || !(window.latestTimeMs > window.earliestTimeMs)) {
    throw new SeeingInputError('The plausible time range must run from an earlier to a later finite time.');
  }
}

/** Throws SeeingInputError when a monitor setting is present but unusable. */
export function validateMonitor(monitor: MonitorSettings): void {
  requirePositive(monitor.wavelengthNm, 'wavelengthNm', 'nanometres');
  if (monitor.apertureMm !== undefined) requirePositive(monitor.apertureMm, 'apertureMm', 'millimetres');
  if (monitor.baselineMm !== undefined) requirePositive(monitor.baselineMm, 'baselineMm', 'millimetres');
  if (monitor.pixelScaleArcsec !== undefined) requirePositive(monitor.pixelScaleArcsec, 'pixelScaleArcsec', 'arcseconds per pixel');
  if (monitor.exposureMs !== undefined) requirePositive(monitor.exposureMs, 'exposureMs', 'milliseconds');
  if (monitor.anisotropyRatioLimit !== undefined && !(monitor.anisotropyRatioLimit >= 1)) {
    throw new SeeingInputError(`anisotropyRatioLimit must be a ratio ≥ 1, got ${String(monitor.anisotropyRatioLimit)}`);
  }
}

/** The reduction's constants for one monitor and measure, folded once per reader (both row readers use these). */
export interface FoldedReduction {
  /** (500 nm / λ)^(-1/5): seeing measured at λ to the reference wavelength. */
  toReferenceSeeing: number;
  /** 0.98 λ_ref in arcsec·cm: seeing = this / r0 (r0 at the reference wavelength, in cm). */
  r0ScaleCmArcsec: number;
  /** A per axis: ε(zenith, 500 nm) = A (σ² cos z)^(3/5); 0 when the measure is not a variance. */
  longFactor: number;
  transFactor: number;
  /** Variances in px² times this are in arcsec² (1 for variances logged in arcsec²). */
  varianceToArcsec2: number;
}

/**
 * Constants folded once so a row costs a few multiplications and powers:
 * ε(zenith, 500 nm) = A (σ² cos z)^(3/5), A = 0.98 λ (λ² D^(-1/3) K)^(-3/5) (500/λ)^(-1/5) in arcsec units.
 */
export function foldReduction(monitor: MonitorSettings, measure: MeasureSource): FoldedReduction {
  const wavelengthM = monitor.wavelengthNm * 1e-9;
  const toReferenceSeeing = (REFERENCE_WAVELENGTH_NM / monitor.wavelengthNm) ** (-1 / 5);
  const r0ScaleCmArcsec = SEEING_CONSTANT * REFERENCE_WAVELENGTH_NM * 1e-9 * ARCSEC_PER_RADIAN * 100;
  let longFactor = 0;
  let transFactor = 0;
  let varianceToArcsec2 = 1;
  if (measure === 'variance_arcsec2' || measure === 'variance_px2') {
    const apertureM = (monitor.apertureMm ?? 0) * 1e-3;
    const baselineRatio = (monitor.baselineMm ?? 0) / (monitor.apertureMm ?? 1);
    const coefficients = responseCoefficients(baselineRatio, monitor.response);
    const axisFactor = (coefficient: number): number =>
      SEEING_CONSTANT * wavelengthM * (wavelengthM * wavelengthM * apertureM ** (-1 / 3) * coefficient) ** (-3 / 5) * ARCSEC_PER_RADIAN ** (1 - 6 / 5) * toReferenceSeeing;
    longFactor = axisFactor(coefficients.longitudinal);
    transFactor = axisFactor(coefficients.transverse);
    if (measure === 'variance_px2' && monitor.pixelScaleArcsec !== undefined) varianceToArcsec2 = monitor.pixelScaleArcsec ** 2;
  }
  return { toReferenceSeeing, r0ScaleCmArcsec, longFactor, transFactor, varianceToArcsec2 };
}

/** Picks the measure a reader uses, or explains (LogFormatError) why none can be used with these settings. */
export function chooseMeasure(mapping: ColumnMapping, monitor: MonitorSettings): MeasureSource {
  const hasGeometry = monitor.apertureMm !== undefined && monitor.baselineMm !== undefined;
  const arcsecVariances = mapping.var_long_arcsec2 !== undefined && mapping.var_trans_arcsec2 !== undefined;
  const pixelVariances = mapping.var_long_px2 !== undefined && mapping.var_trans_px2 !== undefined;
  if (arcsecVariances && hasGeometry) return 'variance_arcsec2';
  if (pixelVariances && hasGeometry && monitor.pixelScaleArcsec !== undefined) return 'variance_px2';
  if (mapping.seeing_arcsec !== undefined) return 'seeing';
  if (mapping.r0_cm !== undefined) return 'r0';
  if ((arcsecVariances || pixelVariances) && !hasGeometry) {
    throw new LogFormatError('The log holds image-motion variances, but the monitor geometry is not known.', {
      hint: 'Give the sub-aperture diameter and the baseline (analyzer: --aperture-mm D --baseline-mm B).',
    });
  }
  if (pixelVariances) {
    throw new LogFormatError('The log holds variances in pixel², but no pixel scale was given.', {
      hint: 'Give the plate scale in arcsec per pixel (analyzer: --pixel-scale-arcsec P).',
    });
  }
  throw new LogFormatError('The log has no usable seeing measure.', {
    hint: 'Map both variances, or seeing_arcsec, or r0_cm (analyzer: --map field=Header).',
  });
}

/**
 * The fields holding the variances at twice the exposure time that a reader with this measure uses, or null:
 * only both axes in the unit of the variances being read.
 */
export function interlacedFields(mapping: ColumnMapping, measure: MeasureSource): [LogField, LogField] | null {
  if (measure !== 'variance_arcsec2' && measure !== 'variance_px2') return null;
  const fields: [LogField, LogField] = measure === 'variance_px2' ? ['var_long_2x_px2', 'var_trans_2x_px2'] : ['var_long_2x_arcsec2', 'var_trans_2x_arcsec2'];
  return mapping[fields[0]] !== undefined && mapping[fields[1]] !== undefined ? fields : null;
}

/**
 * The centroid-noise fields a reader with this measure subtracts, or null: only both axes in the unit of the
 * variances being read (checkMapping reports a half pair or a pair in the other unit).
 */
export function noiseFields(mapping: ColumnMapping, measure: MeasureSource): [LogField, LogField] | null {
  if (measure !== 'variance_arcsec2' && measure !== 'variance_px2') return null;
  const fields: [LogField, LogField] = measure === 'variance_px2' ? ['noise_long_px2', 'noise_trans_px2'] : ['noise_long_arcsec2', 'noise_trans_arcsec2'];
  return mapping[fields[0]] !== undefined && mapping[fields[1]] !== undefined ? fields : null;
}

function columnIndex(headers: readonly string[], mapping: ColumnMapping, field: LogField): number {
  const header = mapping[field];
  return header === undefined ? -1 : headers.indexOf(header);
}

/** ε(τ)/ε(2τ) above which the correction factor (ε(τ)/ε(2τ))^0.75 exceeds MAX_EXPOSURE_CORRECTION_FACTOR. */
const MAX_CORRECTION_SEEING_RATIO = MAX_EXPOSURE_CORRECTION_FACTOR ** (4 / 3);
const MISSING = Number.NaN;
/** Why the last readNumber gave NaN for a non-empty field: 1 = not finite (NaN, inf), 2 = not decimal notation. */
let lastFieldProblem: 0 | 1 | 2 = 0;
const NON_FINITE = 1;
const NOT_DECIMAL = 2;
/**
 * A field as a decimal number (optionally with exponent; with decimalComma also "0,85"), or NaN with
 * lastFieldProblem set: NON_FINITE for 'NaN', 'inf', 'Infinity' or a value beyond the double range (what a
 * program prints for a diverged result: non_physical, as documented), NOT_DECIMAL for the other notations
 * Number() would silently accept (hex 0x1A, octal 0o17, binary 0b101).
 */
function readNumber(fields: readonly string[], index: number, decimalComma: boolean): number {
  lastFieldProblem = 0;
  if (index < 0) return MISSING;
  const text = fields[index];
  if (text === undefined) return MISSING;
  // Number() ignores surrounding white space itself, but reads an empty or blank field as 0: check only then.
  let value = Number(text);
  if (value === 0 && text.trim() === '') return MISSING;
  if (Number.isNaN(value)) {
    const trimmed = text.trim();
    if (trimmed === '') return MISSING;
    if (decimalComma && trimmed.includes(',')) value = Number(trimmed.replace(',', '.'));
    if (Number.isNaN(value)) {
      if (/^[+-]?(nan|inf|infinity)$/i.test(trimmed)) lastFieldProblem = NON_FINITE;
      return MISSING;
    }
    return value;
  }
  if (!Number.isFinite(value)) {
    // 'Infinity' spelled out, or '1e400' beyond the double range.
    lastFieldProblem = NON_FINITE;
    return MISSING;
  }
  // Number() also reads 0x1A, 0o17 and 0b101: a decimal field's first non-blank characters are never '0' + letter.
  let first = 0;
  while (text.charCodeAt(first) === 32 || text.charCodeAt(first) === 9) first += 1;
  if (text.charCodeAt(first) === 48 && text.length > first + 1) {
    const letter = text.charCodeAt(first + 1) | 32;
    if (letter === 120 || letter === 111 || letter === 98) {
      lastFieldProblem = NOT_DECIMAL;
      return MISSING;
    }
  }
  return value;
}

function optionalNumber(fields: readonly string[], index: number, decimalComma: boolean): number | null {
  if (index < 0) return null;
  const value = readNumber(fields, index, decimalComma);
  return Number.isFinite(value) ? value : null;
}

/**
 * Builds a function that turns one row (its fields, and its 1-based line for messages) into a sample at zenith
 * and 500 nm, or a rejection with its reason: unreadable_time, implausible_time (outside the plausibility
 * window's years), missing_value (empty or unreadable number), non_decimal_number (0x1A, 0o17, 0b101),
 * non_physical (variance/seeing/r0 ≤ 0, NaN or overflow, zenith outside [0°, 90°), airmass < 1),
 * noise_dominated (logged centroid noise above MAX_NOISE_SHARE of a variance), exposure_correction_too_large
 * (a correction above MAX_EXPOSURE_CORRECTION_FACTOR) or implausible_seeing (the reduced seeing outside the plausibility window, 0.05″–10″ by default).
 * Variances → r0 per axis with the chosen response coefficients (Tokovinin 2002 / Sarazin & Roddier 1990),
 * r0 ∝ λ^(6/5) (cos z)^(3/5) to the reference, ε = 0.98 λ/r0 per axis, sample seeing = their mean.
 * With variances at twice the exposure time (var_…_2x_…, same unit) each axis is extrapolated to zero exposure
 * (exposureTimeCorrection, Tokovinin 2002) before the axes are averaged, except on noise-dominated pairs.
 * With centroid-noise variances (noise_…, same unit) 2σc² is subtracted from each axis's variance first.
 * With both pointing columns mapped, a blank zenith angle falls back to the airmass.
 * Sun altitude is attached when a site is given. Throws LogFormatError when the mapping cannot work,
 * SeeingInputError for bad settings. `delimiter` ';' or tab lets "0,85" be read as 0.85.
 */
export function createRowReader(options: {
  headers: readonly string[];
  mapping: ColumnMapping;
  monitor: MonitorSettings;
  site?: SiteLocation;
  delimiter?: string;
  /** Overrides of the default plausibility window (defaultPlausibility() as of now). */
  plausibility?: Partial<PlausibilityWindow>;
  /** How the time column is written (parseTimeAs); ISO 8601 by default. */
  timeFormat?: TimeFormat;
  /** The zone of times that carry none, in minutes east of UTC (a file logged in local time); 0 by default. */
  utcOffsetMinutes?: number;
}): (fields: readonly string[], line: number) => RowResult {
  const { headers, mapping, monitor, site } = options;
  const timeFormat = options.timeFormat ?? 'iso';
  const utcOffsetMinutes = options.utcOffsetMinutes ?? 0;
  validateMonitor(monitor);
  const plausible: PlausibilityWindow = { ...defaultPlausibility(), ...options.plausibility };
  validatePlausibility(plausible);
  const { minSeeingArcsec, maxSeeingArcsec, earliestTimeMs, latestTimeMs } = plausible;
  const problems = checkMapping(mapping, headers);
  if (problems.length > 0) {
    throw new LogFormatError(`The columns cannot be read: ${problems[0] ?? ''}`, {
      line: 1,
      hint: `${problems.slice(1).join(' ')} Map columns with --map field=Header (fields: README, "Log format").`.trim(),
    });
  }
  const dateIndex = columnIndex(headers, mapping, 'date_utc');
  if (dateIndex >= 0 && (timeFormat === 'jd' || timeFormat === 'mjd')) {
    throw new LogFormatError(`The date column "${mapping.date_utc ?? ''}" cannot be combined with ${timeFormat === 'jd' ? 'Julian dates' : 'modified Julian dates'}: such a number holds the date already.`, {
      line: 1,
      hint: 'Leave date_utc unmapped (analyzer: drop --date-column), or choose the time format the two columns are written in (iso, dmy or mdy).',
    });
  }
  const measure = chooseMeasure(mapping, monitor);
  const decimalComma = options.delimiter !== undefined && options.delimiter !== ',';
  const timeIndex = columnIndex(headers, mapping, 'time_utc');
  const zenithIndex = columnIndex(headers, mapping, 'zenith_deg');
  const airmassIndex = columnIndex(headers, mapping, 'airmass');
  const seeingIndex = columnIndex(headers, mapping, 'seeing_arcsec');
  const r0Index = columnIndex(headers, mapping, 'r0_cm');
  const longIndex = columnIndex(headers, mapping, measure === 'variance_px2' ? 'var_long_px2' : 'var_long_arcsec2');
  const transIndex = columnIndex(headers, mapping, measure === 'variance_px2' ? 'var_trans_px2' : 'var_trans_arcsec2');
  const interlaced = interlacedFields(mapping, measure);
  const long2xIndex = interlaced === null ? -1 : columnIndex(headers, mapping, interlaced[0]);
  const trans2xIndex = interlaced === null ? -1 : columnIndex(headers, mapping, interlaced[1]);
  const noise = noiseFields(mapping, measure);
  const noiseLongIndex = noise === null ? -1 : columnIndex(headers, mapping, noise[0]);
  const noiseTransIndex = noise === null ? -1 : columnIndex(headers, mapping, noise[1]);
  const fluxIndex = columnIndex(headers, mapping, 'flux');
  const scintIndex = columnIndex(headers, mapping, 'scint_index');
  const tau0Index = columnIndex(headers, mapping, 'tau0_ms');
  const theta0Index = columnIndex(headers, mapping, 'theta0_arcsec');
  const windIndex = columnIndex(headers, mapping, 'wind_ms');
  const rhIndex = columnIndex(headers, mapping, 'rh_pct');
  const sunAltitude = site === undefined ? null : createSunAltitude(site);
  const anisotropyLimit = monitor.anisotropyRatioLimit ?? DEFAULT_ANISOTROPY_RATIO_LIMIT;

  const { toReferenceSeeing, r0ScaleCmArcsec, longFactor, transFactor, varianceToArcsec2 } = foldReduction(monitor, measure);
  const measureName = measure === 'seeing' ? 'seeing_arcsec' : measure === 'r0' ? 'r0_cm' : measure === 'variance_px2' ? 'var_…_px2' : 'var_…_arcsec2';

  return (fields) => {
    // Date and time of day in two columns are read as one stamp, "date time".
    const timeText = dateIndex < 0 ? fields[timeIndex] : joinDateTime(fields[dateIndex], fields[timeIndex]);
    const timeMs = timeText === undefined ? Number.NaN : parseTimeAs(timeText, timeFormat, utcOffsetMinutes);
    if (Number.isNaN(timeMs)) {
      const shown = timeText === undefined || timeText.trim() === '' ? 'an empty time' : `"${timeText.slice(0, 40)}"`;
      return { ok: false, reason: 'unreadable_time', message: `${shown} is not ${timeFormatExample(timeFormat)}` };
    }
    if (timeMs < earliestTimeMs || timeMs > latestTimeMs) {
      return {
        ok: false,
        reason: 'implausible_time',
        message: `the time ${new Date(timeMs).toISOString()} lies outside the plausible range ${new Date(earliestTimeMs).toISOString().slice(0, 10)} to ${new Date(latestTimeMs).toISOString().slice(0, 10)}; check the monitor clock`,
      };
    }

    let zenithDeg = zenithIndex >= 0 ? readNumber(fields, zenithIndex, decimalComma) : MISSING;
    // With both pointing columns mapped, a blank zenith angle falls back to the airmass; a zenith angle that is
    // there but broken (NaN, hex, out of range) is still that row's problem.
    const zenithBlank = Number.isNaN(zenithDeg) && lastFieldProblem === 0;
    if (zenithIndex >= 0 && !(zenithBlank && airmassIndex >= 0)) {
      if (Number.isNaN(zenithDeg)) return missingOrNonFinite('zenith_deg');
      if (!(zenithDeg >= 0 && zenithDeg < 90)) return nonPhysical(`zenith angle ${zenithDeg}° is outside [0°, 90°)`);
    } else {
      const airmass = readNumber(fields, airmassIndex, decimalComma);
      if (Number.isNaN(airmass)) return missingOrNonFinite(zenithIndex >= 0 ? 'zenith_deg (and airmass)' : 'airmass');
      if (!(airmass >= 1)) return nonPhysical(`airmass ${airmass} is below 1`);
      zenithDeg = Math.acos(1 / airmass) / DEG_TO_RAD; // X = sec z
    }
    const cosZenith = Math.cos(zenithDeg * DEG_TO_RAD);

    let seeingArcsec: number;
    let seeingLongArcsec: number | null = null;
    let seeingTransArcsec: number | null = null;
    let anisotropic = false;
    let exposureCorrection: ExposureCorrection | null = null;
    if (measure === 'variance_arcsec2' || measure === 'variance_px2') {
      let varianceLong = readNumber(fields, longIndex, decimalComma);
      if (Number.isNaN(varianceLong)) return missingOrNonFinite(measureName.replace('…', 'long'));
      let varianceTrans = readNumber(fields, transIndex, decimalComma);
      if (Number.isNaN(varianceTrans)) return missingOrNonFinite(measureName.replace('…', 'trans'));
      if (!(varianceLong > 0) || !(varianceTrans > 0)) {
        return nonPhysical(`variances must be > 0, got ${varianceLong} and ${varianceTrans}`);
      }
      if (noise !== null) {
        // σ²_atm = σ²_measured − 2σc²: the differential signal is the difference of two independent centroids.
        const noiseLong = readNumber(fields, noiseLongIndex, decimalComma);
        if (Number.isNaN(noiseLong)) return missingOrNonFinite(noise[0]);
        const noiseTrans = readNumber(fields, noiseTransIndex, decimalComma);
        if (Number.isNaN(noiseTrans)) return missingOrNonFinite(noise[1]);
        if (!(noiseLong >= 0) || !(noiseTrans >= 0)) return nonPhysical(`centroid-noise variances must be ≥ 0, got ${noiseLong} and ${noiseTrans}`);
        const shareLong = (2 * noiseLong) / varianceLong;
        const shareTrans = (2 * noiseTrans) / varianceTrans;
        if (shareLong > MAX_NOISE_SHARE || shareTrans > MAX_NOISE_SHARE) {
          const share = Math.max(shareLong, shareTrans);
          return {
            ok: false,
            reason: 'noise_dominated',
            message: `centroid noise (2σc²) is ${(share * 100).toFixed(0)} % of the measured variance on the ${shareLong >= shareTrans ? 'longitudinal' : 'transverse'} axis; at most ${MAX_NOISE_SHARE * 100} % can be subtracted`,
          };
        }
        varianceLong -= 2 * noiseLong;
        varianceTrans -= 2 * noiseTrans;
      }
      seeingLongArcsec = longFactor * (varianceLong * varianceToArcsec2 * cosZenith) ** (3 / 5);
      seeingTransArcsec = transFactor * (varianceTrans * varianceToArcsec2 * cosZenith) ** (3 / 5);
      if (interlaced !== null) {
        const varianceLong2x = readNumber(fields, long2xIndex, decimalComma);
        if (Number.isNaN(varianceLong2x)) return missingOrNonFinite(interlaced[0]);
        const varianceTrans2x = readNumber(fields, trans2xIndex, decimalComma);
        if (Number.isNaN(varianceTrans2x)) return missingOrNonFinite(interlaced[1]);
        if (!(varianceLong2x > 0) || !(varianceTrans2x > 0)) {
          return nonPhysical(`variances at twice the exposure time must be > 0, got ${varianceLong2x} and ${varianceTrans2x}`);
        }
        // Reduced to zenith and 500 nm like the base exposure: both carry the same factor c (airmass, wavelength,
        // response, plate scale), and (c ε1)^1.75 (c ε2)^(-0.75) = c^(1.75-0.75) ε1^1.75 ε2^(-0.75) = c · rule(ε1, ε2)
        // since the exponents sum to 1, so correcting after the reduction equals correcting the raw seeing.
        const seeingLong2xArcsec = longFactor * (varianceLong2x * varianceToArcsec2 * cosZenith) ** (3 / 5);
        const seeingTrans2xArcsec = transFactor * (varianceTrans2x * varianceToArcsec2 * cosZenith) ** (3 / 5);
        // A longer exposure cannot show more motion: a pair with ε(2τ) > ε(τ) on either axis is noise-dominated
        // and the whole sample stays uncorrected (seeing-physics.md §3.1, "flag them rather than extrapolate").
        // Compared on the seeing values the rule receives, so its own refusal can never fire here.
        if (seeingLong2xArcsec > seeingLongArcsec || seeingTrans2xArcsec > seeingTransArcsec) {
          exposureCorrection = 'not_applied_noisy';
        } else if (seeingLongArcsec > seeingLong2xArcsec * MAX_CORRECTION_SEEING_RATIO || seeingTransArcsec > seeingTrans2xArcsec * MAX_CORRECTION_SEEING_RATIO) {
          const factor = Math.max(seeingLongArcsec / seeingLong2xArcsec, seeingTransArcsec / seeingTrans2xArcsec) ** 0.75;
          return {
            ok: false,
            reason: 'exposure_correction_too_large',
            message: `the exposure-time correction would multiply the seeing by ×${factor.toFixed(2)} (more than ×${MAX_EXPOSURE_CORRECTION_FACTOR}): the exposures at τ and 2τ do not look like the same turbulence`,
          };
        } else {
          seeingLongArcsec = exposureTimeCorrection(seeingLongArcsec, seeingLong2xArcsec);
          seeingTransArcsec = exposureTimeCorrection(seeingTransArcsec, seeingTrans2xArcsec);
          exposureCorrection = 'applied';
        }
      }
      seeingArcsec = (seeingLongArcsec + seeingTransArcsec) / 2;
      const ratio = seeingLongArcsec > seeingTransArcsec ? seeingLongArcsec / seeingTransArcsec : seeingTransArcsec / seeingLongArcsec;
      anisotropic = ratio > anisotropyLimit;
    } else if (measure === 'seeing') {
      const measured = readNumber(fields, seeingIndex, decimalComma);
      if (Number.isNaN(measured)) return missingOrNonFinite('seeing_arcsec');
      if (!(measured > 0)) return nonPhysical(`seeing ${measured}″ must be > 0`);
      seeingArcsec = measured * cosZenith ** (3 / 5) * toReferenceSeeing;
    } else {
      const measured = readNumber(fields, r0Index, decimalComma);
      if (Number.isNaN(measured)) return missingOrNonFinite('r0_cm');
      if (!(measured > 0)) return nonPhysical(`r0 ${measured} cm must be > 0`);
      // r0(zenith, 500 nm) = r0 (cos z)^(-3/5) (500/λ)^(6/5); seeing from it.
      const r0ReferenceCm = measured * cosZenith ** (-3 / 5) * (REFERENCE_WAVELENGTH_NM / monitor.wavelengthNm) ** (6 / 5);
      seeingArcsec = r0ScaleCmArcsec / r0ReferenceCm;
    }

    if (!(seeingArcsec >= minSeeingArcsec && seeingArcsec <= maxSeeingArcsec)) {
      return {
        ok: false,
        reason: 'implausible_seeing',
        message: `seeing ${seeingArcsec.toPrecision(3)}″ (zenith, 500 nm) is outside the plausible window ${minSeeingArcsec}″–${maxSeeingArcsec}″; check the units of ${measureName} and the monitor settings`,
      };
    }

    return {
      ok: true,
      sample: {
        timeMs,
        seeingArcsec,
        r0Cm: r0ScaleCmArcsec / seeingArcsec,
        zenithDeg,
        seeingLongArcsec,
        seeingTransArcsec,
        anisotropic,
        exposureCorrection,
        sunAltDeg: sunAltitude === null ? null : sunAltitude(timeMs),
        flux: optionalNumber(fields, fluxIndex, decimalComma),
        scintIndex: optionalNumber(fields, scintIndex, decimalComma),
        tau0Ms: optionalNumber(fields, tau0Index, decimalComma),
        theta0Arcsec: optionalNumber(fields, theta0Index, decimalComma),
        windMs: optionalNumber(fields, windIndex, decimalComma),
        rhPct: optionalNumber(fields, rhIndex, decimalComma),
      },
    };
  };
}

/** "date time" from two columns; undefined (an unreadable time) when either is missing. */
function joinDateTime(date: string | undefined, time: string | undefined): string | undefined {
  if (date === undefined || time === undefined) return undefined;
  return `${date.trim()} ${time.trim()}`;
}

function missingOrNonFinite(field: string): RowResult {
  if (lastFieldProblem === NON_FINITE) return { ok: false, reason: 'non_physical', message: `${field} is not a finite number (NaN, infinity or beyond the number range)` };
  if (lastFieldProblem === NOT_DECIMAL) {
    return { ok: false, reason: 'non_decimal_number', message: `${field} is not written as a decimal number (hexadecimal, octal or binary notation); write it like 0.85 or 8.5e-1` };
  }
  return { ok: false, reason: 'missing_value', message: `${field} is empty or not a number` };
}

function nonPhysical(what: string): RowResult {
  return { ok: false, reason: 'non_physical', message: what };
}
