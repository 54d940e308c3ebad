import { requirePositive } from '../errors.js';
import { ARCSEC_PER_RADIAN, SEEING_CONSTANT } from './constants.js';

/**
 * Seeing FWHM ε = 0.98 λ / r0 (Tokovinin 2002, PASP 114, 1156, eq. 5), in arcsec, at the wavelength r0 refers to.
 * Example: seeingFromR0(10, 500) → 1.0106″.
 */
export function seeingFromR0(r0Cm: number, wavelengthNm: number): number {
  requirePositive(r0Cm, 'r0Cm', 'centimetres');
  requirePositive(wavelengthNm, 'wavelengthNm', 'nanometres');
  return ((SEEING_CONSTANT * wavelengthNm * 1e-9) / (r0Cm / 100)) * ARCSEC_PER_RADIAN;
}
