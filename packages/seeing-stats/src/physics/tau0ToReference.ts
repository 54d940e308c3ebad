import { requirePositive, requireRange } from '../errors.js';
import { DEG_TO_RAD, REFERENCE_WAVELENGTH_NM } from './constants.js';

/**
 * Coherence time measured at zenith angle z and wavelength λ reduced to zenith and 500 nm:
 * τ0 = 0.314 r0 / V̄ (Kellerer & Tokovinin 2007, A&A 461, 775, Table 1) with r0 ∝ λ^(6/5) (cos z)^(3/5), so
 * τ0 ∝ λ^(6/5) (cos z)^(3/5) and τ0(0, 500 nm) = τ0 (500/λ)^(6/5) (cos z)^(-3/5). That the effective wind speed V̄
 * does not change with z is an assumption (from memory of common practice; the weighting of V̄ by Cn² does not
 * depend on the line of sight's length).
 * Needs τ0 > 0, z in [0°, 90°), λ > 0. Throws SeeingInputError otherwise. Example: tau0ToReference(3.0, 60, 500) → 4.547 ms.
 */
export function tau0ToReference(tau0Ms: number, zenithDeg: number, wavelengthNm: number): number {
  requirePositive(tau0Ms, 'tau0Ms', 'milliseconds');
  requireRange(zenithDeg, 'zenithDeg', 0, 90, 'degrees');
  requirePositive(wavelengthNm, 'wavelengthNm', 'nanometres');
  return tau0Ms * (REFERENCE_WAVELENGTH_NM / wavelengthNm) ** (6 / 5) * Math.cos(zenithDeg * DEG_TO_RAD) ** (-3 / 5);
}
