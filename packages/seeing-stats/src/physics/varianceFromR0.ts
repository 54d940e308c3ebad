import { requirePositive } from '../errors.js';
import { ARCSEC_PER_RADIAN } from './constants.js';

/**
 * The forward DIMM formula σ² = K λ² r0^(-5/3) D^(-1/3) (Sarazin & Roddier 1990; Tokovinin 2002), in arcsec².
 * r0 is at the measurement wavelength and zenith angle. Used to make synthetic logs and round-trip tests.
 * Example: varianceFromR0(10, 0.2338, 500, 60) ≈ 0.2948 arcsec² (σ_l = 0.5430″, seeing-physics.md §2.4).
 */
export function varianceFromR0(r0Cm: number, coefficient: number, wavelengthNm: number, apertureMm: number): number {
  requirePositive(r0Cm, 'r0Cm', 'centimetres');
  requirePositive(coefficient, 'coefficient', 'dimensionless units');
  requirePositive(wavelengthNm, 'wavelengthNm', 'nanometres');
  requirePositive(apertureMm, 'apertureMm', 'millimetres');
  const wavelengthM = wavelengthNm * 1e-9;
  const r0M = r0Cm / 100;
  const apertureM = apertureMm * 1e-3;
  const varianceRad2 = coefficient * wavelengthM * wavelengthM * r0M ** (-5 / 3) * apertureM ** (-1 / 3);
  return varianceRad2 * ARCSEC_PER_RADIAN * ARCSEC_PER_RADIAN;
}
