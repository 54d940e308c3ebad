import { SeeingInputError } from '../errors.js';
import { percentileSorted } from '../stats/percentile.js';
import { dayNumberLabel, nightDayNumber, solarOffsetMs } from './nightLabel.js';
import type { SampleColumns } from './summarizeSeeing.js';

export interface PairedNight {
  /** The night's name, 'YYYY-MM-DD' of its evening (each site's own local solar time). */
  night: string;
  samplesA: number;
  samplesB: number;
  medianA: number;
  medianB: number;
  /** medianA − medianB (arcsec; negative: A was sharper that night). */
  differenceArcsec: number;
}

export interface NightPairing {
  /** The common nights, in date order. */
  nights: PairedNight[];
  /** Each site's seeing on the common nights, grouped by common night (group g = nights[g]), each group sorted. */
  groupedA: { values: Float64Array; offsets: Int32Array };
  groupedB: { values: Float64Array; offsets: Int32Array };
  /** 'nights': every sample of a common night; 'bins': only samples in a time bin where the other site ran too. */
  matching: 'nights' | 'bins';
  binMinutes: number | null;
}

export interface PairingOptions {
  /** Site longitudes (east positive) for each site's night labels; UTC when absent. */
  longitudeDegA?: number;
  longitudeDegB?: number;
  /** Match finer than nights: keep a sample only when the other site has one in the same UTC bin of this many minutes (e.g. 10). */
  matchedBinMinutes?: number;
}

/**
 * Pairs two sites' samples on common nights: the nights (named as nightLabel names them, each site with its own
 * longitude) on which both monitors have samples, with each site's type-7 nightly median and their difference.
 * With matchedBinMinutes the pairing is finer: first each site keeps only the samples in a UTC time bin of that
 * many minutes (bins counted from 1970-01-01T00:00Z) in which the other site has a sample too, so both sites are
 * compared over the same hours. Comparing on simultaneous periods is what makes short campaigns comparable
 * (seeing-physics.md §6.4). Needs equal-length columns with positive finite seeing; throws SeeingInputError otherwise.
 * Example: A has nights 1–3 March, B 2–4 March → two common nights, 2 and 3 March.
 */
export function pairNights(siteA: SampleColumns, siteB: SampleColumns, options: PairingOptions = {}): NightPairing {
  requireColumns(siteA, 'siteA');
  requireColumns(siteB, 'siteB');
  const binMinutes = options.matchedBinMinutes;
  if (binMinutes !== undefined && !(binMinutes > 0 && Number.isFinite(binMinutes))) {
    throw new SeeingInputError(`matchedBinMinutes must be a positive number of minutes, got ${String(binMinutes)}`);
  }
  let keepA: Uint8Array | null = null;
  let keepB: Uint8Array | null = null;
  if (binMinutes !== undefined) {
    const binMs = binMinutes * 60_000;
    const binsA = new Set(Array.from(siteA.timeMs, (time) => Math.floor(time / binMs)));
    const binsB = new Set(Array.from(siteB.timeMs, (time) => Math.floor(time / binMs)));
    keepA = Uint8Array.from(siteA.timeMs, (time) => (binsB.has(Math.floor(time / binMs)) ? 1 : 0));
    keepB = Uint8Array.from(siteB.timeMs, (time) => (binsA.has(Math.floor(time / binMs)) ? 1 : 0));
  }
  const nightsA = byNight(siteA, solarOffsetMs(options.longitudeDegA), keepA);
  const nightsB = byNight(siteB, solarOffsetMs(options.longitudeDegB), keepB);
  const common = [...nightsA.keys()].filter((night) => nightsB.has(night)).sort((left, right) => left - right);
  const nights: PairedNight[] = [];
  const valuesA: number[] = [];
  const valuesB: number[] = [];
  const offsetsA = [0];
  const offsetsB = [0];
  for (const night of common) {
    const sortedA = Float64Array.from(nightsA.get(night) ?? []).sort();
    const sortedB = Float64Array.from(nightsB.get(night) ?? []).sort();
    const medianA = percentileSorted(sortedA, 0.5);
    const medianB = percentileSorted(sortedB, 0.5);
    nights.push({ night: dayNumberLabel(night), samplesA: sortedA.length, samplesB: sortedB.length, medianA, medianB, differenceArcsec: medianA - medianB });
    valuesA.push(...sortedA);
    valuesB.push(...sortedB);
    offsetsA.push(valuesA.length);
    offsetsB.push(valuesB.length);
  }
  return {
    nights,
    groupedA: { values: Float64Array.from(valuesA), offsets: Int32Array.from(offsetsA) },
    groupedB: { values: Float64Array.from(valuesB), offsets: Int32Array.from(offsetsB) },
    matching: binMinutes === undefined ? 'nights' : 'bins',
    binMinutes: binMinutes ?? null,
  };
}

function requireColumns(columns: SampleColumns, name: string): void {
  if (columns.timeMs.length !== columns.seeingArcsec.length) {
    throw new SeeingInputError(`${name}: timeMs and seeingArcsec must have equal length, got ${columns.timeMs.length} and ${columns.seeingArcsec.length}`);
  }
  columns.seeingArcsec.forEach((value, index) => {
    if (!(value > 0 && Number.isFinite(value))) throw new SeeingInputError(`${name}: seeingArcsec must hold positive finite arcseconds, got ${String(value)} at index ${index}`);
  });
}

function byNight(columns: SampleColumns, offsetMs: number, keep: Uint8Array | null): Map<number, number[]> {
  const nights = new Map<number, number[]>();
  for (let index = 0; index < columns.timeMs.length; index += 1) {
    if (keep !== null && keep[index] !== 1) continue;
    const night = nightDayNumber(columns.timeMs[index] ?? 0, offsetMs);
    const members = nights.get(night) ?? [];
    members.push(columns.seeingArcsec[index] ?? Number.NaN);
    nights.set(night, members);
  }
  return nights;
}
