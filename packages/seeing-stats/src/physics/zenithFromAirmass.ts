import { SeeingInputError } from '../errors.js';
import { DEG_TO_RAD } from './constants.js';

/** Zenith angle from airmass with X = sec z (plane-parallel atmosphere): z = acos(1/X). Needs X ≥ 1. Example: zenithFromAirmass(2) → 60°. */
export function zenithFromAirmass(airmass: number): number {
  if (typeof airmass !== 'number' || !Number.isFinite(airmass) || airmass < 1) {
    throw new SeeingInputError(`airmass must be a number ≥ 1 (sec z), got ${String(airmass)}`);
  }
  return Math.acos(1 / airmass) / DEG_TO_RAD;
}
