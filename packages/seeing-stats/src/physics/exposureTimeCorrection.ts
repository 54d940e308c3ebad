import { requirePositive, SeeingInputError } from '../errors.js';

/**
 * Seeing extrapolated to zero exposure time from interlaced exposures τ and 2τ:
 * ε0 = ε(τ)^1.75 ε(2τ)^(-0.75), the "modified exponential" rule of Tokovinin 2002, PASP 114, 1156
 * (exponents from memory, seeing-physics.md §3.1). A finite exposure smooths the motion, so ε(2τ) ≤ ε(τ);
 * data with ε(2τ) > ε(τ) are noise-dominated or non-stationary and are refused rather than extrapolated.
 * Example: exposureTimeCorrection(0.80, 0.75) → 0.8397″.
 */
export function exposureTimeCorrection(seeingShortArcsec: number, seeingDoubleArcsec: number): number {
  requirePositive(seeingShortArcsec, 'seeingShortArcsec', 'arcseconds');
  requirePositive(seeingDoubleArcsec, 'seeingDoubleArcsec', 'arcseconds');
  if (seeingDoubleArcsec > seeingShortArcsec) {
    throw new SeeingInputError(
      `seeingDoubleArcsec (${seeingDoubleArcsec}) must not exceed seeingShortArcsec (${seeingShortArcsec}): longer exposures cannot show more motion; the pair is noise-dominated`,
    );
  }
  return seeingShortArcsec ** 1.75 * seeingDoubleArcsec ** -0.75;
}
