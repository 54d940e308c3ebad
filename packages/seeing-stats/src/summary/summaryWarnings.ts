import { nightIntervalStatus } from '../stats/nightIntervalStatus.js';
import type { LongitudeSignCheck } from './checkLongitudeSign.js';

export type SummaryWarningCode =
  | 'mixed_response_sets'
  | 'mixed_monitor_heights'
  | 'too_few_nights'
  | 'approximate_interval'
  | 'no_site_longitude'
  | 'longitude_sign'
  | 'wavelength_not_given';

export interface SummaryWarning {
  code: SummaryWarningCode;
  /** One sentence a person can act on. */
  message: string;
}

/** What the caller knows about where the samples come from; every field is optional. */
export interface SummaryContext {
  /** Response coefficient sets of the campaigns pooled into this summary (names or ids, one per campaign). */
  responseSets?: readonly string[];
  /** Monitor heights above ground (m, null when unknown), one per pooled campaign. */
  monitorHeightsM?: readonly (number | null)[];
  /** The measure the seeing was read from, and whether the measurement wavelength was given (not defaulted). */
  measurement?: { measure: 'variance' | 'seeing' | 'r0'; wavelengthGiven: boolean };
  /** The result of checkLongitudeSign on the samples that reached the sun filter. */
  longitudeSign?: LongitudeSignCheck;
}

/**
 * The warnings a summary carries, each a code and a sentence, from what the summary saw (nights, whether a
 * longitude was given) and what its caller knows (SummaryContext). In this order: pooled response sets (they move
 * seeing by 7–10 %, seeing-physics.md §2.3), monitor heights, too few nights or an approximate interval
 * (nightIntervalStatus), no site longitude (nights split at 12:00 UTC), a suspect longitude sign, a seeing or r0 log
 * without its wavelength (image-motion variances do not need one: the reduced seeing does not depend on it).
 * Example: summaryWarnings({ nights: 3, longitudeGiven: true }) → [{ code: 'too_few_nights', message: … }].
 */
export function summaryWarnings(facts: { nights: number; longitudeGiven: boolean; context?: SummaryContext }): SummaryWarning[] {
  const warnings: SummaryWarning[] = [];
  const context = facts.context ?? {};
  const sets = [...new Set(context.responseSets ?? [])];
  if (sets.length > 1) {
    warnings.push({
      code: 'mixed_response_sets',
      message: `These figures pool campaigns reduced with different response coefficient sets (${sets.join(', ')}); the choice moves seeing by 7–10 %, so compare the campaigns' own figures.`,
    });
  }
  const heights = [...new Set((context.monitorHeightsM ?? []).map((height) => (height === null ? 'unknown' : `${height} m`)))];
  if (heights.length > 1) {
    warnings.push({
      code: 'mixed_monitor_heights',
      message: `These figures pool monitors at different heights above ground (${heights.join(', ')}); seeing improves with height, so compare each height's figures.`,
    });
  }
  const interval = nightIntervalStatus(facts.nights);
  if (interval.status === 'too_few_nights') {
    warnings.push({ code: 'too_few_nights', message: `Too few nights for an interval (${facts.nights} ${facts.nights === 1 ? 'night' : 'nights'}): the figures describe these nights, not the site; at least 10 nights are needed for a 95 % interval.` });
  } else if (interval.status === 'approximate') {
    warnings.push({ code: 'approximate_interval', message: `Only ${facts.nights} nights: the 95 % intervals are approximate (a whole-night bootstrap covers less than its nominal 95 % below about 30 nights).` });
  }
  if (!facts.longitudeGiven) {
    warnings.push({
      code: 'no_site_longitude',
      message: 'No site longitude was given, so nights are split at 12:00 UTC: at sites far from Greenwich that cuts nights in two, and the night counts, nightly medians and intervals are wrong. Give the site position.',
    });
  }
  const sign = context.longitudeSign;
  if (sign?.suspicious === true) {
    warnings.push({
      code: 'longitude_sign',
      message: `The sun filter rejects ${(sign.rejectedShare * 100).toFixed(0)} % of the samples, but only ${(sign.mirroredRejectedShare * 100).toFixed(0)} % with the longitude's sign flipped: check the sign of the longitude (east positive).`,
    });
  }
  const measurement = context.measurement;
  if (measurement !== undefined && measurement.measure !== 'variance' && !measurement.wavelengthGiven) {
    warnings.push({
      code: 'wavelength_not_given',
      message: `The ${measurement.measure === 'seeing' ? 'seeing' : 'r0'} values were taken as measured at 500 nm because no wavelength was given; a log measured at another wavelength comes out wrong (an r0 log at 650 nm by 27 %). Give the monitor's wavelength.`,
    });
  }
  return warnings;
}
