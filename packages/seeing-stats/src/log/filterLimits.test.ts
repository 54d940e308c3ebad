import { describe, expect, it } from 'vitest';
import { DEFAULT_FILTERS } from './filterReason.js';
import { filterSettingAllowed, validateFilters } from './filterLimits.js';

describe('filter limits', () => {
  it('allow a zenith limit in (0°, 90°] and a sun limit in [−90°, 90°]', () => {
    expect([0, 0.001, 60, 90, 90.001].map((value) => filterSettingAllowed('maxZenithDeg', value))).toEqual([false, true, true, true, false]);
    expect([-90.5, -90, -18, 90, 91].map((value) => filterSettingAllowed('sunMaxDeg', value))).toEqual([false, true, true, true, false]);
    expect([null, 0, 1000].map((value) => filterSettingAllowed('minFlux', value))).toEqual([true, true, true]);
    expect(filterSettingAllowed('minFlux', Number.NaN)).toBe(false);
  });

  it('name the setting, its range and the value got when refusing', () => {
    expect(() => validateFilters(DEFAULT_FILTERS)).not.toThrow();
    expect(() => validateFilters({ ...DEFAULT_FILTERS, maxZenithDeg: 0 })).toThrow('maxZenithDeg must be between 0 and 90 degrees (more than 0, at most 90), got 0');
    expect(() => validateFilters({ ...DEFAULT_FILTERS, sunMaxDeg: -100 })).toThrow(/sunMaxDeg .* got -100/);
  });
});
