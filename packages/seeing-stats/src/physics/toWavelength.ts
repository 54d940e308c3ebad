import { requirePositive } from '../errors.js';

/** r0 scaled between wavelengths: r0 ∝ λ^(6/5) (Roddier 1981; seeing-physics.md §1.2). Example: r0AtWavelength(10, 500, 2200) → 59.18 cm. */
export function r0AtWavelength(r0Cm: number, fromWavelengthNm: number, toWavelengthNm: number): number {
  requirePositive(r0Cm, 'r0Cm', 'centimetres');
  requirePositive(fromWavelengthNm, 'fromWavelengthNm', 'nanometres');
  requirePositive(toWavelengthNm, 'toWavelengthNm', 'nanometres');
  return r0Cm * (toWavelengthNm / fromWavelengthNm) ** (6 / 5);
}

/** Seeing scaled between wavelengths: ε ∝ λ^(-1/5) (follows from ε = 0.98 λ/r0 and r0 ∝ λ^(6/5)). Example: seeingAtWavelength(1.0106, 500, 2200) → 0.7515″. */
export function seeingAtWavelength(seeingArcsec: number, fromWavelengthNm: number, toWavelengthNm: number): number {
  requirePositive(seeingArcsec, 'seeingArcsec', 'arcseconds');
  requirePositive(fromWavelengthNm, 'fromWavelengthNm', 'nanometres');
  requirePositive(toWavelengthNm, 'toWavelengthNm', 'nanometres');
  return seeingArcsec * (toWavelengthNm / fromWavelengthNm) ** (-1 / 5);
}
