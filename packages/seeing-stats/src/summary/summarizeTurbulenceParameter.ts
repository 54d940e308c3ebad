import { SeeingInputError } from '../errors.js';
import { percentileSorted } from '../stats/percentile.js';
import { hemisphereSeasons, seasonIndexOfMonth, type SeasonCode, type SeasonName } from './hemisphereSeasons.js';
import { dayNumberLabel, nightDayNumber, solarOffsetMs } from './nightLabel.js';

export interface TurbulenceParameterSummary {
  /** Samples with a value (rows without one are left out of this summary only). */
  samples: number;
  p10: number;
  p25: number;
  median: number;
  p75: number;
  p90: number;
  monthly: { month: string; samples: number; median: number; p25: number; p75: number }[];
  seasons: { code: SeasonCode; name: SeasonName | null; samples: number; median: number | null }[];
}

/**
 * Type-7 percentiles (10/25/50/75/90) of a turbulence parameter that rides along with the seeing samples, such
 * as the coherence time τ0 or the isoplanatic angle θ0 already reduced to zenith and 500 nm (tau0ToReference,
 * theta0ToReference), with the same monthly (by night date) and per-season breakdowns as the seeing. A value that
 * is NaN means "not logged for this sample" and is skipped. Returns null when no sample has a value.
 * Throws SeeingInputError for unequal lengths or a value that is not NaN, positive and finite.
 * Example: summarizeTurbulenceParameter(times, Float64Array.of(4, NaN, 6)) → { samples: 2, median: 5, … }.
 */
export function summarizeTurbulenceParameter(
  timeMs: Float64Array,
  values: Float64Array,
  options: { longitudeDeg?: number; latitudeDeg?: number } = {},
): TurbulenceParameterSummary | null {
  if (timeMs.length !== values.length) throw new SeeingInputError(`timeMs and values must have equal length, got ${timeMs.length} and ${values.length}`);
  const offsetMs = solarOffsetMs(options.longitudeDeg);
  const seasons = hemisphereSeasons(options.latitudeDeg);
  const byMonth = new Map<string, number[]>();
  const bySeason: number[][] = [[], [], [], []];
  const all: number[] = [];
  for (let index = 0; index < values.length; index += 1) {
    const value = values[index] ?? Number.NaN;
    if (Number.isNaN(value)) continue;
    if (!(value > 0 && Number.isFinite(value))) throw new SeeingInputError(`values must be positive finite numbers or NaN (not logged), got ${String(value)} at index ${index}`);
    const month = dayNumberLabel(nightDayNumber(timeMs[index] ?? 0, offsetMs)).slice(0, 7);
    const members = byMonth.get(month) ?? [];
    members.push(value);
    byMonth.set(month, members);
    bySeason[seasonIndexOfMonth(Number(month.slice(5, 7)))]?.push(value);
    all.push(value);
  }
  if (all.length === 0) return null;
  const sortedAll = Float64Array.from(all).sort();
  const at = (sorted: Float64Array, fraction: number): number => percentileSorted(sorted, fraction);
  const monthly = [...byMonth.keys()].sort().map((month) => {
    const sorted = Float64Array.from(byMonth.get(month) ?? []).sort();
    return { month, samples: sorted.length, median: at(sorted, 0.5), p25: at(sorted, 0.25), p75: at(sorted, 0.75) };
  });
  return {
    samples: sortedAll.length,
    p10: at(sortedAll, 0.1),
    p25: at(sortedAll, 0.25),
    median: at(sortedAll, 0.5),
    p75: at(sortedAll, 0.75),
    p90: at(sortedAll, 0.9),
    monthly,
    seasons: seasons.map((season, index) => {
      const members = Float64Array.from(bySeason[index] ?? []).sort();
      return { code: season.code, name: season.name, samples: members.length, median: members.length > 0 ? at(members, 0.5) : null };
    }),
  };
}
