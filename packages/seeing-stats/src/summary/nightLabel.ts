import { SeeingInputError } from '../errors.js';

const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

/**
 * A longitude in degrees east, accepted from −180° to 360°, brought to (−180°, 180°]: 190° east is −170°, and
 * −180° is 180°. Every use of a longitude (night labels, local solar hours, the sun's altitude) goes through it,
 * so the same meridian written two ways gives the same nights. Throws SeeingInputError outside [−180, 360].
 * Example: normalizeLongitudeDeg(190) → −170.
 */
export function normalizeLongitudeDeg(longitudeDeg: number): number {
  if (!Number.isFinite(longitudeDeg) || longitudeDeg < -180 || longitudeDeg > 360) {
    throw new SeeingInputError(`longitudeDeg must be degrees east in [-180, 360], got ${String(longitudeDeg)}`);
  }
  if (longitudeDeg > 180) return longitudeDeg - 360;
  if (longitudeDeg === -180) return 180;
  return longitudeDeg;
}

/** Offset of local mean solar time from UTC, in ms: longitude / 15 hours (east positive, normalised to (−180°, 180°]; 0 when no longitude). */
export function solarOffsetMs(longitudeDeg?: number): number {
  if (longitudeDeg === undefined) return 0;
  return (normalizeLongitudeDeg(longitudeDeg) / 15) * HOUR_MS;
}

/**
 * Whole-day number (days since 1970-01-01) of the night a moment belongs to: the local date of
 * (local solar time − 12 h), so a night runs from local noon to local noon and is named by its evening.
 */
export function nightDayNumber(timeMs: number, offsetMs: number): number {
  return Math.floor((timeMs + offsetMs - 12 * HOUR_MS) / DAY_MS);
}

/** 'YYYY-MM-DD' of a day number. */
export function dayNumberLabel(dayNumber: number): string {
  return new Date(dayNumber * DAY_MS).toISOString().slice(0, 10);
}

/**
 * Name of the night a sample belongs to, 'YYYY-MM-DD' of the evening it began: the date of
 * (UTC + longitude/15 h − 12 h); plain UTC when no longitude is given.
 * Example: nightLabel(Date.parse('2025-03-02T03:00:00Z'), -70) → '2025-03-01'.
 */
export function nightLabel(timeMs: number, longitudeDeg?: number): string {
  if (!Number.isFinite(timeMs)) throw new SeeingInputError(`timeMs must be a finite UTC epoch time in ms, got ${String(timeMs)}`);
  return dayNumberLabel(nightDayNumber(timeMs, solarOffsetMs(longitudeDeg)));
}

/**
 * Local solar hour 0..23 of a moment: ⌊(ms into the local day) / 1 h⌋, the ms into the day being
 * ((t % day) + day) % day with t = timeMs + offsetMs.
 */
export function localSolarHour(timeMs: number, offsetMs: number): number {
  const localMs = timeMs + offsetMs;
  const magnitude = Math.abs(localMs);
  // Two floating-point remainders cost more than the rest of a summary's per-sample work, so for 2^28 ≤ |t| < 2^52
  // (1970-01-04 on, either side of 1970) the same number comes from floor division: there t is a multiple of
  // 2^-24 ms, so t − d·day is exact, equals the remainder, and adding a day to a negative remainder is exact too.
  if (magnitude >= 2 ** 28 && magnitude < 2 ** 52) {
    let msIntoDay = localMs - Math.floor(localMs / DAY_MS) * DAY_MS;
    // The quotient can round across a whole day; step back into [0, day).
    if (msIntoDay < 0) msIntoDay += DAY_MS;
    else if (msIntoDay >= DAY_MS) msIntoDay -= DAY_MS;
    return Math.floor(msIntoDay / HOUR_MS);
  }
  const msIntoDay = ((localMs % DAY_MS) + DAY_MS) % DAY_MS;
  return Math.floor(msIntoDay / HOUR_MS);
}
