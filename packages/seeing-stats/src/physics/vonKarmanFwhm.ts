import { requirePositive, requireRange, SeeingInputError } from '../errors.js';
import { REFERENCE_WAVELENGTH_NM } from './constants.js';
import { r0FromSeeing } from './r0FromSeeing.js';
import { seeingAtWavelength } from './toWavelength.js';
import { seeingAtZenithAngle } from './toZenith.js';

export interface VonKarmanOptions {
  /** Seeing at zenith and 500 nm (the reference of every Calmcrest statistic). */
  seeingArcsec: number;
  /** von Kármán outer scale; Calmcrest's default is 25 m (seeing-physics.md §0). */
  outerScaleM: number;
  wavelengthNm: number;
  zenithDeg?: number;
  /** When given, the diameter-dependent Kolb factor (ESO ETC-style, Martinez et al. 2010) is applied. */
  telescopeDiameterM?: number;
}

/**
 * Predicted long-exposure FWHM in a large telescope with a finite outer scale L0:
 * FWHM_vK = FWHM_K sqrt(1 − 2.183 (r0/L0)^0.356), Tokovinin 2002, PASP 114, 1156, eq. 19, with r0 at the
 * observing wavelength and zenith angle; with telescopeDiameterM the factor is sqrt(1 + F_Kolb 2.183 (r0/L0)^0.356),
 * F_Kolb = 1/(1 + 300 D/L0) − 1 (ESO ETC-style form). The fit is unphysical for r0/L0 ≥ 0.112 and is refused there.
 * Example: vonKarmanFwhm({ seeingArcsec: 1.0106, outerScaleM: 20, wavelengthNm: 500 }) → 0.8266″.
 */
export function vonKarmanFwhm(options: VonKarmanOptions): number {
  const { seeingArcsec, outerScaleM, wavelengthNm } = options;
  const zenithDeg = options.zenithDeg ?? 0;
  requirePositive(seeingArcsec, 'seeingArcsec', 'arcseconds');
  requirePositive(outerScaleM, 'outerScaleM', 'metres');
  requirePositive(wavelengthNm, 'wavelengthNm', 'nanometres');
  requireRange(zenithDeg, 'zenithDeg', 0, 90, 'degrees');
  const seeingThereArcsec = seeingAtZenithAngle(seeingAtWavelength(seeingArcsec, REFERENCE_WAVELENGTH_NM, wavelengthNm), zenithDeg);
  const r0ThereM = r0FromSeeing(seeingThereArcsec, wavelengthNm) / 100;
  const outerScaleTerm = 2.183 * (r0ThereM / outerScaleM) ** 0.356;
  let kolbFactor = -1;
  if (options.telescopeDiameterM !== undefined) {
    requirePositive(options.telescopeDiameterM, 'telescopeDiameterM', 'metres');
    kolbFactor = 1 / (1 + (300 * options.telescopeDiameterM) / outerScaleM) - 1;
  }
  const squaredFactor = 1 + kolbFactor * outerScaleTerm;
  if (squaredFactor <= 0) {
    throw new SeeingInputError(
      `outerScaleM (${outerScaleM}) is too small for r0 = ${(r0ThereM * 100).toFixed(2)} cm: Tokovinin's fit needs r0/L0 < 0.112`,
    );
  }
  return seeingThereArcsec * Math.sqrt(squaredFactor);
}
