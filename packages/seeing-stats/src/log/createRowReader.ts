import { LogFormatError, SeeingInputError, requirePositive } from '../errors.js';
import { ARCSEC_PER_RADIAN, DEG_TO_RAD, REFERENCE_WAVELENGTH_NM, SEEING_CONSTANT } from '../physics/constants.js';
import { exposureTimeCorrection } from '../physics/exposureTimeCorrection.js';
import { responseCoefficients, type ResponseSet } from '../physics/responseCoefficients.js';
import { checkMapping } from './checkMapping.js';
import type { ColumnMapping, LogField } from './logFields.js';
import { parseUtcTime } from './parseUtcTime.js';
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

export type RowRejectReason = 'unreadable_time' | 'missing_value' | 'non_physical';
export type FilterRejectReason = 'zenith_limit' | 'sun_above_limit' | 'low_flux';
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

/** The modified-exponential rule the row reader applies, named in outputs. */
export const EXPOSURE_CORRECTION_METHOD =
  'ε0 = ε(τ)^1.75 ε(2τ)^(-0.75) per axis from interlaced exposures (Tokovinin 2002 modified exponential; exponents from memory); samples with ε(2τ) > ε(τ) on an axis are kept uncorrected as noise-dominated';

/** Which input a reader turns into seeing; variances win when the monitor geometry is known. */
export type MeasureSource = 'variance_arcsec2' | 'variance_px2' | 'seeing' | 'r0';

export const DEFAULT_ANISOTROPY_RATIO_LIMIT = 1.3;

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

function columnIndex(headers: readonly string[], mapping: ColumnMapping, field: LogField): number {
  const header = mapping[field];
  return header === undefined ? -1 : headers.indexOf(header);
}

const MISSING = Number.NaN;
/** Number() of a field, or a code: NaN means empty/unreadable, and `nonFinite` marks 'NaN'/'inf' text. */
let lastFieldWasNonFinite = false;
function readNumber(fields: readonly string[], index: number, decimalComma: boolean): number {
  lastFieldWasNonFinite = false;
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
    if (Number.isNaN(value) && /^[+-]?(nan|inf|infinity)$/i.test(trimmed)) {
      lastFieldWasNonFinite = true;
      return MISSING;
    }
  } else if (!Number.isFinite(value)) {
    lastFieldWasNonFinite = true;
    return MISSING;
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
 * and 500 nm, or a rejection with its reason: unreadable_time, missing_value (empty or unreadable number) or
 * non_physical (variance/seeing/r0 ≤ 0, NaN/inf, zenith outside [0°, 90°), airmass < 1).
 * Variances → r0 per axis with the chosen response coefficients (Tokovinin 2002 / Sarazin & Roddier 1990),
 * r0 ∝ λ^(6/5) (cos z)^(3/5) to the reference, ε = 0.98 λ/r0 per axis, sample seeing = their mean.
 * With variances at twice the exposure time (var_…_2x_…, same unit) each axis is extrapolated to zero exposure
 * (exposureTimeCorrection, Tokovinin 2002) before the axes are averaged, except on noise-dominated pairs.
 * Sun altitude is attached when a site is given. Throws LogFormatError when the mapping cannot work,
 * SeeingInputError for bad settings. `delimiter` ';' or tab lets "0,85" be read as 0.85.
 */
export function createRowReader(options: {
  headers: readonly string[];
  mapping: ColumnMapping;
  monitor: MonitorSettings;
  site?: SiteLocation;
  delimiter?: string;
}): (fields: readonly string[], line: number) => RowResult {
  const { headers, mapping, monitor, site } = options;
  validateMonitor(monitor);
  const problems = checkMapping(mapping, headers);
  if (problems.length > 0) {
    throw new LogFormatError(`The columns cannot be read: ${problems[0] ?? ''}`, {
      line: 1,
      hint: `${problems.slice(1).join(' ')} Map columns with --map field=Header (fields: README, "Log format").`.trim(),
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
  const fluxIndex = columnIndex(headers, mapping, 'flux');
  const scintIndex = columnIndex(headers, mapping, 'scint_index');
  const tau0Index = columnIndex(headers, mapping, 'tau0_ms');
  const theta0Index = columnIndex(headers, mapping, 'theta0_arcsec');
  const windIndex = columnIndex(headers, mapping, 'wind_ms');
  const rhIndex = columnIndex(headers, mapping, 'rh_pct');
  const sunAltitude = site === undefined ? null : createSunAltitude(site);
  const anisotropyLimit = monitor.anisotropyRatioLimit ?? DEFAULT_ANISOTROPY_RATIO_LIMIT;

  // Constants folded once so a row costs a few multiplications and powers:
  // ε(zenith, 500 nm) = A (σ² cos z)^(3/5), A = 0.98 λ (λ² D^(-1/3) K)^(-3/5) (500/λ)^(-1/5) in arcsec units.
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
    if (measure === 'variance_px2') varianceToArcsec2 = (monitor.pixelScaleArcsec ?? 1) ** 2;
  }
  const measureName = measure === 'seeing' ? 'seeing_arcsec' : measure === 'r0' ? 'r0_cm' : measure === 'variance_px2' ? 'var_…_px2' : 'var_…_arcsec2';

  return (fields) => {
    const timeText = fields[timeIndex];
    const timeMs = timeText === undefined ? Number.NaN : parseUtcTime(timeText);
    if (Number.isNaN(timeMs)) {
      const shown = timeText === undefined || timeText.trim() === '' ? 'an empty time' : `"${timeText.slice(0, 40)}"`;
      return { ok: false, reason: 'unreadable_time', message: `${shown} is not an ISO 8601 UTC time like 2025-03-01T23:15:00Z` };
    }

    let zenithDeg: number;
    if (zenithIndex >= 0) {
      zenithDeg = readNumber(fields, zenithIndex, decimalComma);
      if (Number.isNaN(zenithDeg)) return missingOrNonFinite('zenith_deg');
      if (!(zenithDeg >= 0 && zenithDeg < 90)) return nonPhysical(`zenith angle ${zenithDeg}° is outside [0°, 90°)`);
    } else {
      const airmass = readNumber(fields, airmassIndex, decimalComma);
      if (Number.isNaN(airmass)) return missingOrNonFinite('airmass');
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
      const varianceLong = readNumber(fields, longIndex, decimalComma);
      if (Number.isNaN(varianceLong)) return missingOrNonFinite(measureName.replace('…', 'long'));
      const varianceTrans = readNumber(fields, transIndex, decimalComma);
      if (Number.isNaN(varianceTrans)) return missingOrNonFinite(measureName.replace('…', 'trans'));
      if (!(varianceLong > 0) || !(varianceTrans > 0)) {
        return nonPhysical(`variances must be > 0, got ${varianceLong} and ${varianceTrans}`);
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

function missingOrNonFinite(field: string): RowResult {
  if (lastFieldWasNonFinite) return { ok: false, reason: 'non_physical', message: `${field} is not a finite number (NaN or infinity)` };
  return { ok: false, reason: 'missing_value', message: `${field} is empty or not a number` };
}

function nonPhysical(what: string): RowResult {
  return { ok: false, reason: 'non_physical', message: what };
}
