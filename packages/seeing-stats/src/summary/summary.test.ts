import { describe, expect, it } from 'vitest';
// @ts-expect-error jstat ships no type declarations; used only as an outside reference in tests
import jStatModule from 'jstat';
import { createRandom, normalDeviate } from '../stats/random.js';
import { percentileSorted } from '../stats/percentile.js';
import { compareSeeing } from './compareSeeing.js';
import { groupPercentiles } from './groupPercentiles.js';
import { localSolarHour, nightLabel } from './nightLabel.js';
import { predictTelescopeFwhm } from './predictTelescopeFwhm.js';
import { sortPositive } from '../stats/argsortPositive.js';
import { summarizeSeeing, summarizeSeeingPresorted, type SampleColumns } from './summarizeSeeing.js';

const jStat = (jStatModule as { jStat: { percentile(values: number[], fraction: number): number } }).jStat;
const HOUR_MS = 3_600_000;

/** An invented campaign: nights with their own level and a wander inside each night. */
function campaign(seed: number, nights: number, medianArcsec: number, longitudeDeg = 0): SampleColumns {
  const random = createRandom(seed);
  const times: number[] = [];
  const seeing: number[] = [];
  for (let night = 0; night < nights; night += 1) {
    const level = medianArcsec * Math.exp(0.25 * normalDeviate(random));
    // local 20:00 to 04:00 every 5 minutes
    const eveningMs = Date.UTC(2025, 0, 1 + night, 20) - (longitudeDeg / 15) * HOUR_MS;
    for (let step = 0; step < 96; step += 1) {
      times.push(eveningMs + step * 5 * 60_000);
      seeing.push(level * Math.exp(0.1 * normalDeviate(random)));
    }
  }
  return { timeMs: Float64Array.from(times), seeingArcsec: Float64Array.from(seeing) };
}

describe('night labels', () => {
  it('name a night by the local date of its evening', () => {
    expect(nightLabel(Date.parse('2025-03-02T03:00:00Z'))).toBe('2025-03-01');
    expect(nightLabel(Date.parse('2025-03-01T12:00:00Z'))).toBe('2025-03-01');
    expect(nightLabel(Date.parse('2025-03-01T11:59:59Z'))).toBe('2025-02-28');
    // at 70° W local solar time is UTC − 4 h 40 min: 03:00 UTC is 22:20 local on 1 March
    expect(nightLabel(Date.parse('2025-03-02T03:00:00Z'), -70)).toBe('2025-03-01');
    // 16:00 UTC is 11:20 local: still the night that began on 28 February
    expect(nightLabel(Date.parse('2025-03-01T16:00:00Z'), -70)).toBe('2025-02-28');
    // at 150° E local time is UTC + 10 h: 01:00 UTC is 11:00 local, before local noon
    expect(nightLabel(Date.parse('2025-03-02T01:00:00Z'), 150)).toBe('2025-03-01');
  });
});

describe('local solar hours', () => {
  it('equal the hour of the remainder of the day for times before and after 1970 and at day edges', () => {
    const DAY_MS = 86_400_000;
    const byRemainder = (timeMs: number, offsetMs: number): number => Math.floor(((((timeMs + offsetMs) % DAY_MS) + DAY_MS) % DAY_MS) / HOUR_MS);
    const random = createRandom(21);
    const offsets = [0, (-70.15 / 15) * HOUR_MS, (150.3 / 15) * HOUR_MS, (-0.001 / 15) * HOUR_MS];
    const times: number[] = [0, 2 ** 28, -(2 ** 28), 2 ** 28 - 0.25, Date.UTC(2025, 0, 1), Date.UTC(1969, 11, 31, 23, 59, 59, 999)];
    for (let draw = 0; draw < 5000; draw += 1) {
      times.push(Date.UTC(1900, 0, 1) + random() * (Date.UTC(2100, 0, 1) - Date.UTC(1900, 0, 1))); // fractional ms too
      times.push(Math.round(random() * 80_000) * DAY_MS + Math.round(random() * 24) * HOUR_MS + (random() < 0.5 ? -1e-3 : 0)); // hour edges
      times.push((random() - 0.5) * 2 ** 29); // around 1970, either side of the 2^28 ms switch
    }
    for (const offsetMs of offsets) for (const timeMs of times) expect(localSolarHour(timeMs, offsetMs)).toBe(byRemainder(timeMs, offsetMs));
  });
});

describe('group percentiles', () => {
  it('equal the percentiles of each group sorted on its own', () => {
    const random = createRandom(22);
    const groupCount = 40;
    const values = Float64Array.from({ length: 5000 }, () => Math.round(random() * 300) / 100 + 0.01).sort(); // ties on purpose
    const groupOf = Int32Array.from(values, () => Math.floor(random() * random() * groupCount)); // uneven sizes, some groups empty
    const fractions = [0.5, 0.1, 0.25, 0.75, 0.9, 0, 1];
    const { sizes, percentiles } = groupPercentiles(values, groupOf, groupCount, fractions);
    for (let group = 0; group < groupCount; group += 1) {
      const members = Array.from(values).filter((_, index) => groupOf[index] === group);
      expect(sizes[group]).toBe(members.length);
      fractions.forEach((fraction, column) => {
        const result = percentiles[group * fractions.length + column] ?? Number.NaN;
        if (members.length === 0) expect(result).toBeNaN();
        else {
          expect(result).toBe(percentileSorted(Float64Array.from(members), fraction));
          // checked against jstat too, where its percentile is type 7 (it departs from it on groups of two to four)
          if (members.length >= 10) expect(result).toBeCloseTo(jStat.percentile(members, fraction), 12);
        }
      });
    }
  });
});

describe('summarizeSeeing', () => {
  it('gives null for no samples', () => {
    expect(summarizeSeeing({ timeMs: new Float64Array(0), seeingArcsec: new Float64Array(0) })).toBeNull();
  });
  it('reproduces the reference data set: percentiles, log-normal fit, fraction below 0.6″', () => {
    // seeing-physics.md §9 #21
    const seeing = Float64Array.from([0.45, 0.52, 0.58, 0.61, 0.66, 0.7, 0.74, 0.81, 0.93, 1.2]);
    const timeMs = Float64Array.from(seeing, (_, index) => Date.UTC(2025, 0, 1, 22) + index * 60_000);
    const summary = summarizeSeeing({ timeMs, seeingArcsec: seeing });
    expect(summary).not.toBeNull();
    if (summary === null) return;
    expect([summary.seeing.p10, summary.seeing.p25, summary.seeing.median, summary.seeing.p75, summary.seeing.p90].map((value) => Number(value.toFixed(6)))).toEqual([0.513, 0.5875, 0.68, 0.7925, 0.957]);
    expect(summary.lognormal.mu).toBeCloseTo(-0.3666, 4);
    expect(summary.lognormal.sigma).toBeCloseTo(0.2713, 4);
    expect(summary.fractionBelow['0.6']).toBeCloseTo(0.3, 12);
    expect(Object.keys(summary.fractionBelow)).toEqual(['0.6', '0.8', '1.0']);
    expect(summary.nights).toBe(1);
    // One night gives no interval: resampling one night can only return that night, and a "95 % interval"
    // collapsed onto the median covers the truth 0 % of the time (simulateIntervalCoverage). This test used to
    // assert the collapsed interval [0.68, 0.68], which was the wrong answer.
    expect(summary.seeing.medianCi95).toBeNull();
    expect(summary.interval).toEqual({ status: 'too_few_nights', nights: 1, reason: 'too few nights for an interval (1 night)' });
    expect(summary.fractionBelowCi95['0.6']).toBeNull();
    expect(summary.warnings.map((warning) => warning.code)).toEqual(['too_few_nights', 'no_site_longitude']);
  });
  it('gives r0 percentiles equal to those of the per-sample r0 values (checked with jstat)', () => {
    const columns = campaign(1, 20, 0.8);
    const summary = summarizeSeeing(columns);
    const r0Values = Array.from(columns.seeingArcsec, (seeing) => (0.98 * 500e-9 * (180 * 3600 / Math.PI) * 100) / seeing);
    expect(summary?.r0.p10).toBeCloseTo(jStat.percentile(r0Values, 0.1), 9);
    expect(summary?.r0.median).toBeCloseTo(jStat.percentile(r0Values, 0.5), 9);
    expect(summary?.r0.p90).toBeCloseTo(jStat.percentile(r0Values, 0.9), 9);
    expect(summary?.seeing.median).toBeCloseTo(jStat.percentile(Array.from(columns.seeingArcsec), 0.5), 12);
  });
  it('breaks down by night, month and local hour with the site longitude', () => {
    const columns = campaign(2, 45, 0.8, -70);
    const summary = summarizeSeeing(columns, { longitudeDeg: -70, bootstrapReplicates: 200 });
    expect(summary?.nights).toBe(45);
    expect(summary?.nightly[0]?.night).toBe('2025-01-01');
    expect(summary?.nightly.every((night) => night.samples === 96)).toBe(true);
    expect(summary?.monthly.map((month) => [month.month, month.samples])).toEqual([['2025-01', 31 * 96], ['2025-02', 14 * 96]]);
    expect(summary?.hourly.map((hour) => hour.hour)).toEqual([20, 21, 22, 23, 0, 1, 2, 3]);
    expect(summary?.hourly.reduce((sum, hour) => sum + hour.samples, 0)).toBe(45 * 96);
    const histogramTotal = summary?.histogram.reduce((sum, bin) => sum + bin.count, 0);
    expect(histogramTotal).toBe(45 * 96);
    expect(summary?.cdf.at(-1)?.fraction).toBe(1);
    const [low, high] = summary?.seeing.medianCi95 ?? [0, 0];
    expect(low).toBeLessThan(summary?.seeing.median ?? 0);
    expect(high).toBeGreaterThan(summary?.seeing.median ?? 0);
  });
  it('gives nightly and monthly statistics equal to those of each night and month sorted on its own (jstat)', () => {
    const columns = campaign(8, 40, 0.8, -70);
    const summary = summarizeSeeing(columns, { longitudeDeg: -70, bootstrapReplicates: 50 });
    const byKey = (key: (timeMs: number) => string): Map<string, number[]> => {
      const groups = new Map<string, number[]>();
      columns.timeMs.forEach((timeMs, index) => {
        const members = groups.get(key(timeMs)) ?? [];
        members.push(columns.seeingArcsec[index] ?? Number.NaN);
        groups.set(key(timeMs), members);
      });
      return groups;
    };
    const nights = byKey((timeMs) => nightLabel(timeMs, -70));
    expect(summary?.nightly.map((night) => night.night)).toEqual([...nights.keys()].sort());
    for (const night of summary?.nightly ?? []) expect(night.median).toBeCloseTo(jStat.percentile(nights.get(night.night) ?? [], 0.5), 12);
    const months = byKey((timeMs) => nightLabel(timeMs, -70).slice(0, 7));
    for (const month of summary?.monthly ?? []) {
      const members = months.get(month.month) ?? [];
      expect(month.samples).toBe(members.length);
      expect([month.p10, month.p25, month.median, month.p75, month.p90]).toEqual([0.1, 0.25, 0.5, 0.75, 0.9].map((fraction) => expect.closeTo(jStat.percentile(members, fraction), 12)));
    }
  });
  it('gives the same summary from a caller\'s sort of the seeing column, and refuses a wrong one', () => {
    const columns = campaign(9, 30, 0.8, -70);
    // ties across nights, so the order of equal values matters
    columns.seeingArcsec.forEach((seeing, index) => (columns.seeingArcsec[index] = Math.round(seeing * 50) / 50));
    const presorted = sortPositive(columns.seeingArcsec);
    expect(summarizeSeeingPresorted(columns, presorted, { longitudeDeg: -70 })).toEqual(summarizeSeeing(columns, { longitudeDeg: -70 }));
    const firstTie = presorted.sorted.findIndex((value, position) => value === presorted.sorted[position + 1]);
    const tiesSwapped = { order: presorted.order.slice(), sorted: presorted.sorted };
    [tiesSwapped.order[firstTie], tiesSwapped.order[firstTie + 1]] = [presorted.order[firstTie + 1] ?? 0, presorted.order[firstTie] ?? 0];
    expect(() => summarizeSeeingPresorted(columns, tiesSwapped)).toThrow(/not the stable ascending sort/);
    const repeated = { order: presorted.order.slice(), sorted: presorted.sorted };
    repeated.order[1] = repeated.order[0] ?? 0;
    expect(() => summarizeSeeingPresorted(columns, repeated)).toThrow(/not the stable ascending sort/);
    expect(() => summarizeSeeingPresorted(columns, { order: presorted.order.subarray(1), sorted: presorted.sorted.subarray(1) })).toThrow(/must cover every sample/);
  });
  it('is reproducible with the same seed', () => {
    const columns = campaign(3, 30, 0.7);
    expect(summarizeSeeing(columns, { seed: 5 })?.seeing.medianCi95).toEqual(summarizeSeeing(columns, { seed: 5 })?.seeing.medianCi95);
  });
});

describe('compareSeeing', () => {
  it('finds a real difference between a 0.65″ and a 0.90″ site', () => {
    const comparison = compareSeeing(campaign(4, 60, 0.65), campaign(5, 60, 0.9));
    expect(comparison.medianDifferenceArcsec).toBeLessThan(-0.15);
    expect(comparison.ci95[1]).toBeLessThan(0);
    expect(comparison.mannWhitney.pValue).toBeLessThan(0.001);
    expect(comparison.mannWhitney.nightsA).toBe(60);
  });
  it('does not call two draws of the same site different', () => {
    const comparison = compareSeeing(campaign(6, 60, 0.8), campaign(7, 60, 0.8));
    expect(comparison.ci95[0]).toBeLessThan(0);
    expect(comparison.ci95[1]).toBeGreaterThan(0);
    expect(comparison.mannWhitney.pValue).toBeGreaterThan(0.05);
  });
});

describe('predictTelescopeFwhm', () => {
  it('maps a median seeing of 1.011″ (r0 = 10 cm) with L0 = 20 m to 0.8266″ at 500 nm', () => {
    // Tokovinin 2002 eq. 19; seeing-physics.md §9 #13
    const seeingArcsec = (0.98 * 500e-9 * (180 * 3600 / Math.PI)) / 0.1;
    const seeing = { unit: 'arcsec', wavelengthNm: 500, atZenith: true, mean: seeingArcsec, p10: seeingArcsec, p25: seeingArcsec, median: seeingArcsec, p75: seeingArcsec, p90: seeingArcsec, medianCi95: [seeingArcsec, seeingArcsec] } as const;
    const prediction = predictTelescopeFwhm({ ...seeing, medianCi95: [seeingArcsec, seeingArcsec] }, { outerScaleM: 20, wavelengthNm: 500 });
    expect(prediction.median).toBeCloseTo(0.8266, 3);
    expect(predictTelescopeFwhm({ ...seeing, medianCi95: [seeingArcsec, seeingArcsec] }, { wavelengthNm: 500 }).outerScaleM).toBe(25);
  });
});
