import { describe, expect, it } from 'vitest';
import { DEFAULT_FILTERS, filterReason } from './filterReason.js';

describe('filterReason', () => {
  const night = { zenithDeg: 20, sunAltDeg: -30, flux: 20_000 };
  it('leaves out anisotropic samples by default, under their own reason', () => {
    expect(DEFAULT_FILTERS.leaveOutAnisotropic).toBe(true);
    expect(filterReason({ ...night, anisotropic: true }, DEFAULT_FILTERS)).toBe('anisotropic');
    expect(filterReason({ ...night, anisotropic: false }, DEFAULT_FILTERS)).toBeNull();
    // a caller that does not know the flag (e.g. it was never stored) filters nothing on it
    expect(filterReason(night, DEFAULT_FILTERS)).toBeNull();
  });
  it('keeps anisotropic samples when the filter is switched off', () => {
    expect(filterReason({ ...night, anisotropic: true }, { ...DEFAULT_FILTERS, leaveOutAnisotropic: false })).toBeNull();
  });
  it('names the zenith, sun and flux reasons before the anisotropy', () => {
    expect(filterReason({ ...night, zenithDeg: 61, anisotropic: true }, DEFAULT_FILTERS)).toBe('zenith_limit');
    expect(filterReason({ ...night, sunAltDeg: -10, anisotropic: true }, DEFAULT_FILTERS)).toBe('sun_above_limit');
    expect(filterReason({ ...night, flux: 10, anisotropic: true }, { ...DEFAULT_FILTERS, minFlux: 100 })).toBe('low_flux');
    // boundaries pass (README "Log format"): zenith exactly 60°, sun exactly −18°
    expect(filterReason({ ...night, zenithDeg: 60, sunAltDeg: -18 }, DEFAULT_FILTERS)).toBeNull();
  });
});
