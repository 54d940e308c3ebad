/** Fewer nights than this: no 95 % interval is given (its coverage is far below 95 %, see the README). */
export const MINIMUM_NIGHTS_FOR_INTERVAL = 10;
/** From MINIMUM_NIGHTS_FOR_INTERVAL up to this many nights the interval is given but called approximate. */
export const APPROXIMATE_INTERVAL_MAX_NIGHTS = 30;

export interface NightIntervalStatus {
  /** 'too_few_nights': no interval; 'approximate': 10–30 nights; 'ok': more than 30 nights. */
  status: 'too_few_nights' | 'approximate' | 'ok';
  nights: number;
  /** The sentence to show beside (or instead of) the interval; null when the interval needs no note. */
  reason: string | null;
}

/**
 * Whether a whole-night bootstrap interval over this many independent nights means what it says. A seeded
 * simulation with independent nights (simulateIntervalCoverage; figures in the README) shows the nominal 95 %
 * percentile interval covering the true median far less often on few nights: none below 10 nights, a note
 * "approximate" from 10 to 30. The thresholds are Calmcrest's choice from that simulation.
 * Needs a whole number of nights ≥ 0. Example: nightIntervalStatus(3) → { status: 'too_few_nights', reason: 'too few nights for an interval (3 nights)' }.
 */
export function nightIntervalStatus(nights: number): NightIntervalStatus {
  const plural = nights === 1 ? 'night' : 'nights';
  if (nights < MINIMUM_NIGHTS_FOR_INTERVAL) return { status: 'too_few_nights', nights, reason: `too few nights for an interval (${nights} ${plural})` };
  if (nights <= APPROXIMATE_INTERVAL_MAX_NIGHTS) {
    return { status: 'approximate', nights, reason: `approximate interval: only ${nights} nights (a whole-night bootstrap covers less than its nominal 95 % below about ${APPROXIMATE_INTERVAL_MAX_NIGHTS} nights)` };
  }
  return { status: 'ok', nights, reason: null };
}
