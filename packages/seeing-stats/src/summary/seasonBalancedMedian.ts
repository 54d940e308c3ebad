import { SeeingInputError } from '../errors.js';
import { sortPositive } from '../stats/argsortPositive.js';
import { nightDayNumber, solarOffsetMs } from './nightLabel.js';
import type { SampleColumns } from './summarizeSeeing.js';

const DAY_MS = 86_400_000;
export const MONTH_NAMES: readonly string[] = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];

export interface SeasonBalancedMedian {
  /** The weighted median of all samples, each weighted by 1 / (samples in its calendar month). */
  medianArcsec: number;
  /** Calendar months 1–12 with samples, and how many samples each has (all years together). */
  monthsCovered: { month: number; samples: number }[];
  /** Names of the calendar months without a sample ('June', …): the balance cannot make up for those. */
  monthsMissing: string[];
}

/** Calendar month 1–12 of a night day number (the month of the night's evening date). */
export function monthOfDayNumber(dayNumber: number): number {
  return new Date(dayNumber * DAY_MS).getUTCMonth() + 1;
}

/**
 * Season-balanced median: the weighted median (weightedMedian) of all samples, each weighted by
 * 1 / (samples in its calendar month), so that every covered calendar month (January, February, … counted over
 * all years together; a sample's month is that of its night, as in the monthly table) weighs the same, however
 * many samples it has. Long clear months no longer dominate the figure. Months without samples cannot be made
 * up for; they are named in monthsMissing. The equal-month weighting follows the recommendation to weight
 * calendar months equally when coverage is uneven (motivated by Sánchez et al. 2012, arXiv:1206.3319, who note
 * the best-sampled years look best). Returns null for no samples. Throws SeeingInputError for unequal columns or a
 * seeing value that is not positive and finite.
 * Example: three January samples 0.5, 0.6, 0.7″ and one February sample 1.2″ → 0.95″ (the pooled median is 0.65″).
 */
export function seasonBalancedMedian(columns: SampleColumns, options: { longitudeDeg?: number } = {}): SeasonBalancedMedian | null {
  const { timeMs, seeingArcsec } = columns;
  const count = seeingArcsec.length;
  if (timeMs.length !== count) throw new SeeingInputError(`timeMs and seeingArcsec must have equal length, got ${timeMs.length} and ${count}`);
  if (count === 0) return null;
  const offsetMs = solarOffsetMs(options.longitudeDeg);
  const monthOf = new Int32Array(count);
  for (let index = 0; index < count; index += 1) monthOf[index] = monthOfDayNumber(nightDayNumber(timeMs[index] ?? 0, offsetMs));
  const { order, sorted } = sortPositive(seeingArcsec);
  const monthOfSorted = new Int32Array(count);
  for (let position = 0; position < count; position += 1) monthOfSorted[position] = monthOf[order[position] ?? 0] ?? 1;
  return seasonBalancedMedianSorted(sorted, monthOfSorted);
}

/**
 * seasonBalancedMedian of seeing already sorted ascending, with the calendar month 1–12 of each sorted value:
 * for a summary that holds the sort already. Needs at least one value.
 */
export function seasonBalancedMedianSorted(sorted: Float64Array, monthOfSorted: Int32Array): SeasonBalancedMedian {
  const count = sorted.length;
  if (count === 0) throw new SeeingInputError('seasonBalancedMedian needs at least one sample, got none');
  const monthSamples = new Int32Array(13);
  for (let position = 0; position < count; position += 1) {
    const month = monthOfSorted[position] ?? 0;
    monthSamples[month] = (monthSamples[month] ?? 0) + 1;
  }
  const monthsCovered: SeasonBalancedMedian['monthsCovered'] = [];
  const monthsMissing: string[] = [];
  for (let month = 1; month <= 12; month += 1) {
    const samples = monthSamples[month] ?? 0;
    if (samples > 0) monthsCovered.push({ month, samples });
    else monthsMissing.push(MONTH_NAMES[month - 1] ?? String(month));
  }
  // Each covered month's weights add up to 1, so the total is the number of covered months.
  return { medianArcsec: monthWeightedMedian(sorted, monthOfSorted, monthSamples, monthsCovered.length), monthsCovered, monthsMissing };
}

/**
 * weightedMedianSorted(sorted, weights, totalWeight) with weights[p] = 1 / monthSamples[monthOfSorted[p]], each
 * weight worked out as it is added instead of from an array of them (the same additions in the same order, so
 * the same result; a million samples need no 8 MB weight array).
 */
function monthWeightedMedian(sorted: Float64Array, monthOfSorted: Int32Array, monthSamples: Int32Array, totalWeight: number): number {
  const count = sorted.length;
  const half = totalWeight / 2;
  const tolerance = totalWeight * 1e-12;
  let running = 0;
  for (let position = 0; position < count; position += 1) {
    running += 1 / (monthSamples[monthOfSorted[position] ?? 0] ?? 1);
    if (running >= half - tolerance) {
      const value = sorted[position] ?? Number.NaN;
      if (Math.abs(running - half) <= tolerance && position + 1 < count) return (value + (sorted[position + 1] ?? Number.NaN)) / 2;
      return value;
    }
  }
  return sorted[count - 1] ?? Number.NaN;
}
