import { requirePositive, requireRange } from '../errors.js';
import { DEG_TO_RAD, REFERENCE_WAVELENGTH_NM } from './constants.js';

/**
 * Isoplanatic angle measured at zenith angle z and wavelength λ reduced to zenith and 500 nm:
 * θ0 ∝ λ^(6/5) (cos z)^(8/5), so θ0(0, 500 nm) = θ0 (500/λ)^(6/5) (cos z)^(-8/5). The scaling follows from
 * θ0 = [2.91 k² sec^(8/3) z ∫Cn² h^(5/3) dh]^(-3/5), k = 2π/λ (Roddier 1981, Progress in Optics 19, 281, as
 * quoted in A&A 2002; seeing-physics.md §5.2).
 * Needs θ0 > 0, z in [0°, 90°), λ > 0. Throws SeeingInputError otherwise. Example: theta0ToReference(1.0, 60, 500) → 3.031″.
 */
export function theta0ToReference(theta0Arcsec: number, zenithDeg: number, wavelengthNm: number): number {
  requirePositive(theta0Arcsec, 'theta0Arcsec', 'arcseconds');
  requireRange(zenithDeg, 'zenithDeg', 0, 90, 'degrees');
  requirePositive(wavelengthNm, 'wavelengthNm', 'nanometres');
  return theta0Arcsec * (REFERENCE_WAVELENGTH_NM / wavelengthNm) ** (6 / 5) * Math.cos(zenithDeg * DEG_TO_RAD) ** (-8 / 5);
}
