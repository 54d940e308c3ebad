import { SeeingInputError } from '../errors.js';

export type SeasonCode = 'DJF' | 'MAM' | 'JJA' | 'SON';
export type SeasonName = 'winter' | 'spring' | 'summer' | 'autumn';

export interface Season {
  /** The three calendar months by initial: December–February, March–May, June–August, September–November. */
  code: SeasonCode;
  /** Months 1–12 of the season. */
  months: [number, number, number];
  /** The season's name in the site's hemisphere; null when no latitude is known. */
  name: SeasonName | null;
}

export const SEASON_CODES: readonly SeasonCode[] = ['DJF', 'MAM', 'JJA', 'SON'];

/**
 * The four 3-month meteorological seasons (DJF, MAM, JJA, SON, the grouping climatology uses; common practice)
 * named for the site's hemisphere: DJF is winter north of the equator (latitude ≥ 0) and summer south of it.
 * latitudeDeg in [−90, 90], or undefined for unnamed seasons. Throws SeeingInputError for a bad latitude.
 * Example: hemisphereSeasons(-24.6)[0] → { code: 'DJF', months: [12, 1, 2], name: 'summer' }.
 */
export function hemisphereSeasons(latitudeDeg?: number): Season[] {
  if (latitudeDeg !== undefined && !(Number.isFinite(latitudeDeg) && latitudeDeg >= -90 && latitudeDeg <= 90)) {
    throw new SeeingInputError(`latitudeDeg must be degrees in [-90, 90], got ${String(latitudeDeg)}`);
  }
  const northern: SeasonName[] = ['winter', 'spring', 'summer', 'autumn'];
  const southern: SeasonName[] = ['summer', 'autumn', 'winter', 'spring'];
  const names = latitudeDeg === undefined ? null : latitudeDeg >= 0 ? northern : southern;
  const months: [number, number, number][] = [[12, 1, 2], [3, 4, 5], [6, 7, 8], [9, 10, 11]];
  return SEASON_CODES.map((code, index) => ({ code, months: months[index] ?? [12, 1, 2], name: names?.[index] ?? null }));
}

/** Index 0–3 into SEASON_CODES of a calendar month 1–12 (December goes with January and February). */
export function seasonIndexOfMonth(month: number): number {
  return Math.floor((month % 12) / 3);
}
