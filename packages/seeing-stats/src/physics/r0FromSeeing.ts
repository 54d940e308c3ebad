import { requirePositive } from '../errors.js';
import { ARCSEC_PER_RADIAN, SEEING_CONSTANT } from './constants.js';

/**
 * Fried parameter from seeing, r0 = 0.98 λ / ε (Tokovinin 2002, eq. 5 inverted), in cm.
 * Example: r0FromSeeing(1.0, 500) → 10.106 cm.
 */
export function r0FromSeeing(seeingArcsec: number, wavelengthNm: number): number {
  requirePositive(seeingArcsec, 'seeingArcsec', 'arcseconds');
  requirePositive(wavelengthNm, 'wavelengthNm', 'nanometres');
  return ((SEEING_CONSTANT * wavelengthNm * 1e-9) / (seeingArcsec / ARCSEC_PER_RADIAN)) * 100;
}
