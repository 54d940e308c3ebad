import { DEG_TO_RAD, REFERENCE_WAVELENGTH_NM } from '../physics/constants.js';
import {
  chooseMeasure,
  createRowReader,
  defaultPlausibility,
  DEFAULT_ANISOTROPY_RATIO_LIMIT,
  foldReduction,
  interlacedFields,
  noiseFields,
  type LogSample,
  type PlausibilityWindow,
} from './createRowReader.js';
import type { LogField } from './logFields.js';
import { DAYS_IN_MONTH, daysFromCivil, digitsAt } from './parseUtcTime.js';
import { createSunAltitude } from './sunAltitude.js';

/** The row reader's options (createRowReader); the fast reader takes the same ones. */
export type RowReaderOptions = Parameters<typeof createRowReader>[0];

/**
 * Reads one data line in place, straight from the text it was cut from (`text` from `start` to `end`, without
 * its line end), without a string per field: the sample, or null when the line is anything but the plain case,
 * which the caller then reads with createRowReader (so every rejection and its message come from there).
 * The plain case: exactly as many fields as headers, split at a one-character delimiter, no quotes (the caller
 * knows), the time as 'YYYY-MM-DDTHH:MM:SS[.fff…][Z]', every mapped number written as [±]digits[.digits] with at
 * most 15 digits (or, for an optional column, empty), and every check of createRowReader passed. A number of that
 * form is its digits as an integer divided by a power of ten, both exact in a double, so the one correctly rounded
 * division gives the same double as Number() (Clinger's fast path); everything after that repeats createRowReader's
 * arithmetic in the same order, so a sample read here equals the one read there, bit for bit (tested).
 * `sample` is filled in and returned (the caller gives one object for all rows, or a fresh one each time).
 */
export type FastRowReader = (text: string, start: number, end: number, sample: LogSample) => LogSample | null;

/** The options this reader understands; with any other option set (a layout it does not know), there is none. */
const UNDERSTOOD_OPTIONS = new Set(['headers', 'mapping', 'monitor', 'site', 'delimiter', 'plausibility', 'timeFormat', 'utcOffsetMinutes']);
/** Delimiters whose fields text.split(delimiter) cuts (no white-space runs). */
const PLAIN_DELIMITERS = new Set([',', ';', '\t', '|']);
const POWERS_OF_TEN = Array.from({ length: 16 }, (_, exponent) => 10 ** exponent);
const MAX_DIGITS = 15;

/** Column roles in the line. */
const IGNORED = 0;
const TIME = 1;

/**
 * A sample object to fill (every field is overwritten by the reader). Its number fields start as doubles (NaN, not
 * null), so an object reused for every row, whose fields then only ever receive numbers (or only null), keeps them
 * as unboxed doubles: no new heap number a field and row.
 */
export function blankSample(): LogSample {
  return {
    timeMs: Number.NaN,
    seeingArcsec: Number.NaN,
    r0Cm: Number.NaN,
    zenithDeg: Number.NaN,
    seeingLongArcsec: Number.NaN,
    seeingTransArcsec: Number.NaN,
    anisotropic: false,
    exposureCorrection: null,
    sunAltDeg: Number.NaN,
    flux: Number.NaN,
    scintIndex: Number.NaN,
    tau0Ms: Number.NaN,
    theta0Arcsec: Number.NaN,
    windMs: Number.NaN,
    rhPct: Number.NaN,
  };
}

/**
 * The fast reader for these options, or null when they ask for something only createRowReader does (another time
 * format, centroid noise or interlaced exposures, an unknown option, a delimiter other than , ; tab |). Call it
 * after createRowReader accepted the same options (it does not repeat their checks).
 */
export function createFastRowReader(options: RowReaderOptions): FastRowReader | null {
  for (const [key, value] of Object.entries(options)) {
    if (value !== undefined && !UNDERSTOOD_OPTIONS.has(key)) return null;
  }
  const { headers, mapping, monitor, site } = options;
  if ((options.timeFormat ?? 'iso') !== 'iso') return null;
  // Date and time of day in two columns are joined by createRowReader.
  if (options.mapping.date_utc !== undefined) return null;
  const delimiter = options.delimiter ?? ',';
  if (!PLAIN_DELIMITERS.has(delimiter)) return null;
  const utcOffsetMs = (options.utcOffsetMinutes ?? 0) * 60_000; // as parseTimeAs: utcOffsetMinutes * 60_000
  const measure = chooseMeasure(mapping, monitor);
  if (interlacedFields(mapping, measure) !== null || noiseFields(mapping, measure) !== null) return null;
  const plausible: PlausibilityWindow = { ...defaultPlausibility(), ...options.plausibility };
  const { minSeeingArcsec, maxSeeingArcsec, earliestTimeMs, latestTimeMs } = plausible;
  const columnOf = (field: LogField): number => {
    const header = mapping[field];
    return header === undefined ? -1 : headers.indexOf(header);
  };
  const variance = measure === 'variance_arcsec2' || measure === 'variance_px2';
  const timeColumn = columnOf('time_utc');
  const zenithColumn = columnOf('zenith_deg');
  const airmassColumn = columnOf('airmass');
  if (timeColumn < 0 || (zenithColumn < 0 && airmassColumn < 0)) return null;
  // With both pointing columns the airmass stands in for a blank zenith angle: createRowReader handles that row.
  const pointingColumn = zenithColumn >= 0 ? zenithColumn : airmassColumn;
  const fromAirmass = zenithColumn < 0;
  const firstColumn = variance ? columnOf(measure === 'variance_px2' ? 'var_long_px2' : 'var_long_arcsec2') : columnOf(measure === 'seeing' ? 'seeing_arcsec' : 'r0_cm');
  const secondColumn = variance ? columnOf(measure === 'variance_px2' ? 'var_trans_px2' : 'var_trans_arcsec2') : -1;
  if (firstColumn < 0 || (variance && secondColumn < 0)) return null;
  const optionalFields: LogField[] = ['flux', 'scint_index', 'tau0_ms', 'theta0_arcsec', 'wind_ms', 'rh_pct'];

  // Each column's role: IGNORED, TIME, or 2 + the slot its number goes to.
  const width = headers.length;
  const roles = new Int8Array(width);
  const POINTING = 0;
  const FIRST = 1;
  const SECOND = 2;
  const OPTIONAL = 3; // flux … rh_pct in optionalFields order
  const slotCount = OPTIONAL + optionalFields.length;
  const assign = (column: number, role: number): boolean => {
    if (column < 0) return true;
    if ((roles[column] ?? 0) !== IGNORED) return false; // one column mapped to two fields: leave it to createRowReader
    roles[column] = role;
    return true;
  };
  if (!assign(timeColumn, TIME) || !assign(pointingColumn, 2 + POINTING) || !assign(firstColumn, 2 + FIRST) || !assign(secondColumn, 2 + SECOND)) return null;
  for (let index = 0; index < optionalFields.length; index += 1) {
    const field = optionalFields[index];
    if (field !== undefined && !assign(columnOf(field), 2 + OPTIONAL + index)) return null;
  }
  const values = new Float64Array(slotCount);
  /** 1 where the slot's column was empty (an optional value not logged). */
  const empty = new Uint8Array(slotCount).fill(1);

  // The same constants as createRowReader (foldReduction).
  const sunAltitude = site === undefined ? null : createSunAltitude(site);
  const anisotropyLimit = monitor.anisotropyRatioLimit ?? DEFAULT_ANISOTROPY_RATIO_LIMIT;
  const { toReferenceSeeing, r0ScaleCmArcsec, longFactor, transFactor, varianceToArcsec2 } = foldReduction(monitor, measure);
  const wavelengthNm = monitor.wavelengthNm;

  return (text, start, end, sample) => {
    // Cut the fields and read the mapped ones.
    let timeMs = Number.NaN;
    let column = 0;
    let fieldStart = start;
    while (fieldStart <= end) {
      // indexOf runs natively: much faster than a loop over the characters.
      let position = text.indexOf(delimiter, fieldStart);
      if (position < 0 || position > end) position = end;
      if (column >= width) return null;
      const role = roles[column] ?? IGNORED;
      if (role === TIME) {
        timeMs = readIsoTime(text, fieldStart, position);
        if (Number.isNaN(timeMs)) return null;
        // As parseTimeAs: a time without its own zone is in the file's zone.
        if (utcOffsetMs !== 0 && !lastTimeZoned) timeMs -= utcOffsetMs;
      } else if (role !== IGNORED) {
        const slot = role - 2;
        if (position === fieldStart) {
          if (slot < OPTIONAL) return null;
          empty[slot] = 1;
        } else {
          const value = readPlainDecimal(text, fieldStart, position);
          if (Number.isNaN(value)) return null;
          values[slot] = value;
          empty[slot] = 0;
        }
      }
      column += 1;
      fieldStart = position + 1;
    }
    if (column !== width) return null;
    if (timeMs < earliestTimeMs || timeMs > latestTimeMs) return null;

    let zenithDeg = values[POINTING] ?? Number.NaN;
    if (fromAirmass) {
      if (!(zenithDeg >= 1)) return null;
      zenithDeg = Math.acos(1 / zenithDeg) / DEG_TO_RAD;
    } else if (!(zenithDeg >= 0 && zenithDeg < 90)) {
      return null;
    }
    const cosZenith = Math.cos(zenithDeg * DEG_TO_RAD);
    let seeingArcsec: number;
    let seeingLongArcsec: number | null = null;
    let seeingTransArcsec: number | null = null;
    let anisotropic = false;
    if (variance) {
      const varianceLong = values[FIRST] ?? Number.NaN;
      const varianceTrans = values[SECOND] ?? Number.NaN;
      if (!(varianceLong > 0) || !(varianceTrans > 0)) return null;
      seeingLongArcsec = longFactor * (varianceLong * varianceToArcsec2 * cosZenith) ** (3 / 5);
      seeingTransArcsec = transFactor * (varianceTrans * varianceToArcsec2 * cosZenith) ** (3 / 5);
      seeingArcsec = (seeingLongArcsec + seeingTransArcsec) / 2;
      const ratio = seeingLongArcsec > seeingTransArcsec ? seeingLongArcsec / seeingTransArcsec : seeingTransArcsec / seeingLongArcsec;
      anisotropic = ratio > anisotropyLimit;
    } else if (measure === 'seeing') {
      const measured = values[FIRST] ?? Number.NaN;
      if (!(measured > 0)) return null;
      seeingArcsec = measured * cosZenith ** (3 / 5) * toReferenceSeeing;
    } else {
      const measured = values[FIRST] ?? Number.NaN;
      if (!(measured > 0)) return null;
      const r0ReferenceCm = measured * cosZenith ** (-3 / 5) * (REFERENCE_WAVELENGTH_NM / wavelengthNm) ** (6 / 5);
      seeingArcsec = r0ScaleCmArcsec / r0ReferenceCm;
    }
    if (!(seeingArcsec >= minSeeingArcsec && seeingArcsec <= maxSeeingArcsec)) return null;

    sample.timeMs = timeMs;
    sample.seeingArcsec = seeingArcsec;
    sample.r0Cm = r0ScaleCmArcsec / seeingArcsec;
    sample.zenithDeg = zenithDeg;
    sample.seeingLongArcsec = seeingLongArcsec;
    sample.seeingTransArcsec = seeingTransArcsec;
    sample.anisotropic = anisotropic;
    sample.exposureCorrection = null;
    sample.sunAltDeg = sunAltitude === null ? null : sunAltitude(timeMs);
    sample.flux = empty[OPTIONAL] === 1 ? null : (values[OPTIONAL] ?? null);
    sample.scintIndex = empty[OPTIONAL + 1] === 1 ? null : (values[OPTIONAL + 1] ?? null);
    sample.tau0Ms = empty[OPTIONAL + 2] === 1 ? null : (values[OPTIONAL + 2] ?? null);
    sample.theta0Arcsec = empty[OPTIONAL + 3] === 1 ? null : (values[OPTIONAL + 3] ?? null);
    sample.windMs = empty[OPTIONAL + 4] === 1 ? null : (values[OPTIONAL + 4] ?? null);
    sample.rhPct = empty[OPTIONAL + 5] === 1 ? null : (values[OPTIONAL + 5] ?? null);
    return sample;
  };
}

/** Whether the time readIsoTime read last ended in 'Z'. */
let lastTimeZoned = false;

/**
 * UTC epoch ms of 'YYYY-MM-DD[T ]HH:MM:SS[.fff…][Z]' between start and end, with parseUtcTime's checks and its
 * arithmetic (the fraction added digit by digit at falling scale); NaN for any other layout (the caller then
 * leaves the row to parseUtcTime, which knows the others: no seconds, offsets, surrounding blanks).
 */
export function readIsoTime(text: string, start: number, end: number): number {
  const length = end - start;
  if (length < 19 || text.charCodeAt(start + 4) !== 45 || text.charCodeAt(start + 7) !== 45 || text.charCodeAt(start + 13) !== 58 || text.charCodeAt(start + 16) !== 58) {
    return Number.NaN;
  }
  const separator = text.charCodeAt(start + 10);
  if (separator !== 84 && separator !== 32 && separator !== 116) return Number.NaN;
  const year = digitsAt(text, start, 4);
  const month = digitsAt(text, start + 5, 2);
  const day = digitsAt(text, start + 8, 2);
  const hour = digitsAt(text, start + 11, 2);
  const minute = digitsAt(text, start + 14, 2);
  const second = digitsAt(text, start + 17, 2);
  if (year < 0 || month < 1 || month > 12 || day < 1 || hour < 0 || hour > 23 || minute < 0 || minute > 59 || second < 0 || second > 59) return Number.NaN;
  const leap = month === 2 && ((year % 4 === 0 && year % 100 !== 0) || year % 400 === 0);
  if (day > (DAYS_IN_MONTH[month - 1] ?? 31) + (leap ? 1 : 0)) return Number.NaN;
  let milliseconds = second * 1000;
  let cursor = start + 19;
  if (cursor < end && (text.charCodeAt(cursor) === 46 || text.charCodeAt(cursor) === 44)) {
    cursor += 1;
    let scale = 100;
    const fractionStart = cursor;
    while (cursor < end) {
      const code = text.charCodeAt(cursor) - 48;
      if (code < 0 || code > 9) break;
      milliseconds += code * scale;
      scale /= 10;
      cursor += 1;
    }
    if (cursor === fractionStart) return Number.NaN;
  }
  lastTimeZoned = false;
  if (cursor < end) {
    const zone = text.charCodeAt(cursor);
    if (!((zone === 90 || zone === 122) && cursor + 1 === end)) return Number.NaN;
    lastTimeZoned = true;
  }
  return daysFromCivil(year, month, day) * 86_400_000 + (hour * 60 + minute) * 60_000 + milliseconds;
}

/**
 * A number written [+-]digits[.digits] (or [+-].digits, [+-]digits.) with at most MAX_DIGITS digits between start
 * and end, exactly as Number() reads it; NaN for anything else (exponents, blanks, hex, more digits, a decimal comma).
 */
export function readPlainDecimal(text: string, start: number, end: number): number {
  let position = start;
  const first = text.charCodeAt(position);
  const negative = first === 45;
  if (negative || first === 43) position += 1;
  let mantissa = 0;
  let digits = 0;
  let fractionDigits = 0;
  let dot = false;
  for (; position < end; position += 1) {
    const code = text.charCodeAt(position);
    const digit = code - 48;
    if (digit >= 0 && digit <= 9) {
      mantissa = mantissa * 10 + digit;
      digits += 1;
      if (dot) fractionDigits += 1;
    } else if (code === 46 && !dot) {
      dot = true;
    } else {
      return Number.NaN;
    }
  }
  if (digits === 0 || digits > MAX_DIGITS) return Number.NaN;
  const value = fractionDigits === 0 ? mantissa : mantissa / (POWERS_OF_TEN[fractionDigits] ?? Number.NaN);
  return negative ? -value : value;
}
