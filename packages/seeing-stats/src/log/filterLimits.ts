import { SeeingInputError } from '../errors.js';
import type { FilterSettings } from './filterReason.js';

/**
 * The allowed filter settings, shared by the engine (analyzeLog) and the API's query schema, so both refuse the
 * same values: the zenith limit in (0°, 90°] (0 would keep nothing; beyond 90° is below the horizon), the sun limit
 * in [−90°, 90°], a minimum flux finite when given.
 */
/** The numeric settings with a range (leaveOutAnisotropic is a plain switch). */
type LimitedFilter = 'maxZenithDeg' | 'sunMaxDeg' | 'minFlux';

export const FILTER_LIMIT_MESSAGES = {
  maxZenithDeg: 'maxZenithDeg must be between 0 and 90 degrees (more than 0, at most 90).',
  sunMaxDeg: 'sunMaxDeg must be between -90 and 90 degrees.',
  minFlux: 'minFlux must be a finite number of flux units.',
} as const satisfies Record<LimitedFilter, string>;

/** Whether one filter setting is allowed (see FILTER_LIMIT_MESSAGES). */
export function filterSettingAllowed<Name extends LimitedFilter>(name: Name, value: FilterSettings[Name]): boolean {
  if (value === null) return name === 'minFlux';
  if (typeof value !== 'number' || !Number.isFinite(value)) return false;
  if (name === 'maxZenithDeg') return value > 0 && value <= 90;
  if (name === 'sunMaxDeg') return value >= -90 && value <= 90;
  return true;
}

/** Throws SeeingInputError naming the first setting outside its range, with the value got. */
export function validateFilters(filters: FilterSettings): void {
  for (const name of ['maxZenithDeg', 'sunMaxDeg', 'minFlux'] as const) {
    if (!filterSettingAllowed(name, filters[name])) throw new SeeingInputError(`${FILTER_LIMIT_MESSAGES[name].slice(0, -1)}, got ${String(filters[name])}`);
  }
}
