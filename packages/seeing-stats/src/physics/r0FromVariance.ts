import { requirePositive } from '../errors.js';
import { ARCSEC_PER_RADIAN } from './constants.js';

/**
 * Fried parameter from one differential image-motion variance: r0 = [K λ² D^(-1/3) / σ²]^(3/5)
 * (inversion of σ² = K λ² r0^(-5/3) D^(-1/3); Sarazin & Roddier 1990, Tokovinin 2002).
 * The variance is angular (arcsec²); r0 comes out at the measurement wavelength and zenith angle.
 * Example: r0FromVariance(0.5430², 0.2338, 500, 60) ≈ 10.0 cm.
 */
export function r0FromVariance(varianceArcsec2: number, coefficient: number, wavelengthNm: number, apertureMm: number): number {
  requirePositive(varianceArcsec2, 'varianceArcsec2', 'square arcseconds');
  requirePositive(coefficient, 'coefficient', 'dimensionless units');
  requirePositive(wavelengthNm, 'wavelengthNm', 'nanometres');
  requirePositive(apertureMm, 'apertureMm', 'millimetres');
  return r0FromVarianceUnchecked(varianceArcsec2, coefficient, wavelengthNm, apertureMm);
}

/** The same formula without argument checks, for the row reader's inner loop (inputs already validated). */
export function r0FromVarianceUnchecked(varianceArcsec2: number, coefficient: number, wavelengthNm: number, apertureMm: number): number {
  const varianceRad2 = varianceArcsec2 / (ARCSEC_PER_RADIAN * ARCSEC_PER_RADIAN);
  const wavelengthM = wavelengthNm * 1e-9;
  const apertureM = apertureMm * 1e-3;
  const r0M = ((coefficient * wavelengthM * wavelengthM * apertureM ** (-1 / 3)) / varianceRad2) ** (3 / 5);
  return r0M * 100;
}
