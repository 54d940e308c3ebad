import { SeeingInputError } from '../errors.js';
import { percentileSorted } from '../stats/percentile.js';
import { nightDayNumber, solarOffsetMs } from './nightLabel.js';
import type { SampleColumns, SortedSeeing } from './summarizeSeeing.js';

/** The few figures a list of sites shows per site. */
export interface SeeingBrief {
  samples: number;
  /** Local nights with at least one sample (as summarizeSeeing counts them). */
  nights: number;
  /** Type-7 quartiles and median of the seeing, in arcseconds. */
  p25: number;
  median: number;
  p75: number;
}

/**
 * The samples, nights, median and quartiles of summarizeSeeingPresorted, exactly, without the rest of a summary
 * (no bootstrap, fit, histogram, months or hours): for a list of many sites, where only these are shown.
 * `presorted` must be the seeing sort (sortPositive) of columns.seeingArcsec; only its sorted values are read.
 * Returns null without samples (summarizeSeeing's null). Throws SeeingInputError for columns of unequal length.
 * Example: briefSeeing({ timeMs, seeingArcsec }, sortPositive(seeingArcsec), { longitudeDeg: -70 }).
 */
export function briefSeeing(columns: SampleColumns, presorted: Pick<SortedSeeing, 'sorted'>, options: { longitudeDeg?: number } = {}): SeeingBrief | null {
  const { timeMs, seeingArcsec } = columns;
  const count = seeingArcsec.length;
  if (timeMs.length !== count) throw new SeeingInputError(`timeMs and seeingArcsec must have equal length, got ${timeMs.length} and ${count}`);
  if (presorted.sorted.length !== count) throw new SeeingInputError(`presorted must sort all ${count} seeing values, got ${presorted.sorted.length}`);
  if (count === 0) return null;
  const offsetMs = solarOffsetMs(options.longitudeDeg);
  // Distinct night day numbers: samples are mostly in time order, so a night is usually the one just seen; a
  // set catches the rest (several campaigns pooled, out-of-order times).
  const seen = new Set<number>();
  let previous = Number.NaN;
  for (let index = 0; index < count; index += 1) {
    const night = nightDayNumber(timeMs[index] ?? 0, offsetMs);
    if (night !== previous) {
      seen.add(night);
      previous = night;
    }
  }
  const { sorted } = presorted;
  return { samples: count, nights: seen.size, p25: percentileSorted(sorted, 0.25), median: percentileSorted(sorted, 0.5), p75: percentileSorted(sorted, 0.75) };
}
