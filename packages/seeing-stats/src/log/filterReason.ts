import type { FilterRejectReason, LogSample } from './createRowReader.js';

export interface FilterSettings {
  /** Samples with a zenith angle above this are dropped; 60° (airmass 2) by default. */
  maxZenithDeg: number;
  /** Samples with the sun above this altitude are dropped; −18° (astronomical night) by default. */
  sunMaxDeg: number;
  /** Samples with a known flux below this are dropped; null = no flux filter. */
  minFlux: number | null;
  /**
   * Leave out samples flagged anisotropic (their longitudinal and transverse estimates differ by more than the set
   * ratio, as on a wind-shaken night); true when absent. Counted under the reason 'anisotropic'.
   */
  leaveOutAnisotropic?: boolean;
}

/**
 * How far past the zenith limit a sample may lie and still pass, in degrees (about 0.04″): a limit is a boundary
 * a person typed, and a pointing logged as airmass 2 becomes acos(1/2) = 60.000000000000014° in floating point.
 * Common practice (a comparison tolerance far below any pointing accuracy), no source.
 */
export const ZENITH_LIMIT_TOLERANCE_DEG = 1e-5;

export const DEFAULT_FILTERS: FilterSettings = { maxZenithDeg: 60, sunMaxDeg: -18, minFlux: null, leaveOutAnisotropic: true };

/**
 * The first filter a sample fails, in the order zenith limit, sun altitude, flux, anisotropy; null when it passes.
 * The sun filter applies only when the sample has a sun altitude (a site was given), the flux filter only
 * when the sample has a flux, the anisotropy filter only when the sample says whether it is anisotropic (the
 * flag comes from variance inputs; a caller that does not know it leaves it out). Boundaries pass: zenith exactly
 * at the limit (within ZENITH_LIMIT_TOLERANCE_DEG, so airmass 2 passes 60°), sun exactly at the limit, flux equal to the minimum.
 * Example: filterReason({ zenithDeg: 20, sunAltDeg: -30, flux: null, anisotropic: true }, DEFAULT_FILTERS) → 'anisotropic'.
 */
export function filterReason(sample: Pick<LogSample, 'zenithDeg' | 'sunAltDeg' | 'flux'> & { anisotropic?: boolean }, filters: FilterSettings): FilterRejectReason | null {
  if (sample.zenithDeg > filters.maxZenithDeg + ZENITH_LIMIT_TOLERANCE_DEG) return 'zenith_limit';
  if (sample.sunAltDeg !== null && sample.sunAltDeg > filters.sunMaxDeg) return 'sun_above_limit';
  if (filters.minFlux !== null && sample.flux !== null && sample.flux < filters.minFlux) return 'low_flux';
  if (sample.anisotropic === true && filters.leaveOutAnisotropic !== false) return 'anisotropic';
  return null;
}
