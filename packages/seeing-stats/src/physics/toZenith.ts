import { requirePositive, requireRange } from '../errors.js';
import { DEG_TO_RAD } from './constants.js';

/**
 * Seeing measured at zenith angle z reduced to zenith: ε(0) = ε(z) (cos z)^(3/5)
 * (r0 ∝ (cos z)^(3/5); Roddier 1981; ESO astroclimatology pages). Example: seeingToZenith(0.90, 45) → 0.7310″.
 */
export function seeingToZenith(seeingArcsec: number, zenithDeg: number): number {
  requirePositive(seeingArcsec, 'seeingArcsec', 'arcseconds');
  requireRange(zenithDeg, 'zenithDeg', 0, 90, 'degrees');
  return seeingArcsec * Math.cos(zenithDeg * DEG_TO_RAD) ** (3 / 5);
}

/** Seeing at zenith seen at zenith angle z: ε(z) = ε(0) (sec z)^(3/5). Example: seeingAtZenithAngle(0.80, 60) → 1.213″. */
export function seeingAtZenithAngle(seeingAtZenithArcsec: number, zenithDeg: number): number {
  requirePositive(seeingAtZenithArcsec, 'seeingAtZenithArcsec', 'arcseconds');
  requireRange(zenithDeg, 'zenithDeg', 0, 90, 'degrees');
  return seeingAtZenithArcsec * Math.cos(zenithDeg * DEG_TO_RAD) ** (-3 / 5);
}

/** Fried parameter measured at zenith angle z reduced to zenith: r0(0) = r0(z) (cos z)^(-3/5). Example: r0ToZenith(8.123, 45) → 10.0 cm. */
export function r0ToZenith(r0Cm: number, zenithDeg: number): number {
  requirePositive(r0Cm, 'r0Cm', 'centimetres');
  requireRange(zenithDeg, 'zenithDeg', 0, 90, 'degrees');
  return r0Cm * Math.cos(zenithDeg * DEG_TO_RAD) ** (-3 / 5);
}

/** Fried parameter at zenith seen at zenith angle z: r0(z) = r0(0) (cos z)^(3/5). Example: r0AtZenithAngle(10, 60) → 6.598 cm. */
export function r0AtZenithAngle(r0AtZenithCm: number, zenithDeg: number): number {
  requirePositive(r0AtZenithCm, 'r0AtZenithCm', 'centimetres');
  requireRange(zenithDeg, 'zenithDeg', 0, 90, 'degrees');
  return r0AtZenithCm * Math.cos(zenithDeg * DEG_TO_RAD) ** (3 / 5);
}
