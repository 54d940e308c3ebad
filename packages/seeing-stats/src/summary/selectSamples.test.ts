import { describe, expect, it } from 'vitest';
import { median as referenceMedian, quantileSorted as referenceQuantileSorted } from 'simple-statistics';
import { DEFAULT_FILTERS, filterReason } from '../log/filterReason.js';
import { sortPositive } from '../stats/argsortPositive.js';
import { createRandom } from '../stats/random.js';
import { lowerBoundTime, selectRun, selectRuns, selectSamples, type ExcludedWindow, type SampleQuery, type StoredSampleColumns } from './selectSamples.js';
import { summarizeSeeing, summarizeSeeingPresorted } from './summarizeSeeing.js';

const MINUTE_MS = 60_000;
const START_MS = Date.UTC(2025, 4, 1);

/** An invented run: one sample a minute, seeing on a coarse grid so values tie often, some flux and sun values missing. */
function run(seed: number, count: number, startMs: number): StoredSampleColumns {
  const random = createRandom(seed);
  const column = (value: (index: number) => number) => Float64Array.from({ length: count }, (_, index) => value(index));
  return {
    count,
    timeMs: column((index) => startMs + index * MINUTE_MS),
    seeingArcsec: column(() => Math.round((0.4 + random()) * 40) / 40),
    zenithDeg: column(() => random() * 70),
    sunAltDeg: column(() => (random() < 0.1 ? Number.NaN : -40 + random() * 30)),
    flux: column(() => (random() < 0.5 ? Number.NaN : random() * 1000)),
  };
}

/** The plain, sample-by-sample selection the engine's must agree with. */
function naiveSelection(columns: StoredSampleColumns, exclusions: readonly ExcludedWindow[], query: SampleQuery) {
  const seeing: number[] = [];
  const reasons: Record<string, number> = {};
  let stored = 0;
  for (let index = 0; index < columns.count; index += 1) {
    const timeMs = columns.timeMs[index] ?? 0;
    if ((query.fromMs !== null && timeMs < query.fromMs) || (query.toMs !== null && timeMs >= query.toMs)) continue;
    stored += 1;
    const sun = columns.sunAltDeg[index] ?? Number.NaN;
    const flux = columns.flux[index] ?? Number.NaN;
    const reason = exclusions.some((window) => timeMs >= window.fromMs && timeMs < window.toMs)
      ? 'excluded_window'
      : filterReason({ zenithDeg: columns.zenithDeg[index] ?? 0, sunAltDeg: Number.isNaN(sun) ? null : sun, flux: Number.isNaN(flux) ? null : flux }, query.filters);
    if (reason === null) seeing.push(columns.seeingArcsec[index] ?? Number.NaN);
    else reasons[reason] = (reasons[reason] ?? 0) + 1;
  }
  return { seeing, reasons, stored };
}

describe('selectRun', () => {
  it('takes the time range from inclusive to exclusive, then exclusions, then the filters, counting every sample left out', () => {
    const columns = run(7, 600, START_MS);
    const exclusions = [{ fromMs: START_MS + 100 * MINUTE_MS, toMs: START_MS + 160 * MINUTE_MS }];
    const query: SampleQuery = { fromMs: START_MS + 50 * MINUTE_MS, toMs: START_MS + 500 * MINUTE_MS, filters: { maxZenithDeg: 45, sunMaxDeg: -18, minFlux: 300 } };
    const selection = selectRun({ columns, exclusions }, query);
    const naive = naiveSelection(columns, exclusions, query);
    expect(selection.stored).toBe(450);
    expect(selection.stored).toBe(naive.stored);
    expect(Array.from(selection.accepted, (index) => columns.seeingArcsec[index])).toEqual(naive.seeing);
    expect(selection.accepted[0]).toBeGreaterThanOrEqual(50);
    expect(selection.accepted[selection.accepted.length - 1]).toBeLessThan(500);
    const { rejectedByReason } = selectRuns([{ columns, exclusions }], query);
    expect(rejectedByReason).toEqual(naive.reasons);
    // A window takes every sample in it, whatever the filters would say.
    expect(rejectedByReason.excluded_window).toBe(60);
    expect(selection.accepted.length + Object.values(rejectedByReason).reduce((sum, count) => sum + (count ?? 0), 0)).toBe(selection.stored);
  });

  it('lists the reasons in the order they are first met', () => {
    const columns: StoredSampleColumns = {
      count: 3,
      timeMs: Float64Array.from([0, 1, 2]),
      seeingArcsec: Float64Array.from([0.8, 0.8, 0.8]),
      zenithDeg: Float64Array.from([10, 80, 10]),
      sunAltDeg: Float64Array.from([0, -30, -30]),
      flux: Float64Array.from([Number.NaN, Number.NaN, Number.NaN]),
    };
    const { rejectedByReason } = selectRuns([{ columns, exclusions: [{ fromMs: 2, toMs: 3 }] }], { fromMs: null, toMs: null, filters: DEFAULT_FILTERS });
    expect(Object.keys(rejectedByReason)).toEqual(['sun_above_limit', 'zenith_limit', 'excluded_window']);
  });

  it('finds the first time at or after a bound by binary search', () => {
    const times = Float64Array.from([10, 20, 20, 30]);
    expect([5, 10, 15, 20, 25, 30, 35].map((timeMs) => lowerBoundTime(times, 4, timeMs))).toEqual([0, 0, 1, 1, 3, 3, 4]);
    // Only the first `count` entries count.
    expect(lowerBoundTime(times, 2, 35)).toBe(2);
  });
});

describe('selectSamples', () => {
  const first = run(11, 2000, START_MS);
  const second = run(12, 1500, START_MS + 3000 * MINUTE_MS);
  const runs = [first, second].map((columns, slot) => ({
    columns,
    exclusions: slot === 0 ? [{ fromMs: START_MS + 200 * MINUTE_MS, toMs: START_MS + 260 * MINUTE_MS }] : [],
    seeingSort: sortPositive(columns.seeingArcsec.subarray(0, columns.count)),
  }));
  const query: SampleQuery = { fromMs: START_MS + 100 * MINUTE_MS, toMs: null, filters: { ...DEFAULT_FILTERS, minFlux: 200 } };

  it('assembles from the runs\u2019 kept sorts exactly the sort the engine would make of the selected samples', () => {
    const selected = selectSamples(runs, query);
    const direct = sortPositive(selected.seeingArcsec);
    expect(selected.presorted.order).toEqual(direct.order);
    expect(selected.presorted.sorted).toEqual(direct.sorted);
    expect(summarizeSeeingPresorted({ timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec }, selected.presorted)).toEqual(
      summarizeSeeing({ timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec }),
    );
  });

  it('selects the same samples as a sample-by-sample filter, whose median and quartiles simple-statistics agrees with', () => {
    const selected = selectSamples(runs, query);
    const naive = [naiveSelection(first, runs[0]?.exclusions ?? [], query), naiveSelection(second, [], query)];
    const naiveSeeing = naive.flatMap((part) => part.seeing);
    expect(Array.from(selected.seeingArcsec)).toEqual(naiveSeeing);
    expect(selected.stored).toBe((naive[0]?.stored ?? 0) + (naive[1]?.stored ?? 0));
    // Outside reference: simple-statistics' median and type-7 quantiles of the plain filtered values.
    const sorted = [...naiveSeeing].sort((left, right) => left - right);
    const summary = summarizeSeeingPresorted({ timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec }, selected.presorted);
    expect(summary?.seeing.median).toBeCloseTo(referenceMedian(naiveSeeing), 12);
    expect(summary?.seeing.p25).toBeCloseTo(referenceQuantileSorted(sorted, 0.25), 12);
    expect(summary?.seeing.p90).toBeCloseTo(referenceQuantileSorted(sorted, 0.9), 12);
  });

  it('gives empty columns and only counts when nothing passes', () => {
    const selected = selectSamples(runs, { fromMs: null, toMs: null, filters: { ...DEFAULT_FILTERS, maxZenithDeg: 0.0001 } });
    expect(selected.seeingArcsec).toHaveLength(0);
    expect(selected.presorted.order).toHaveLength(0);
    expect(selected.stored).toBe(3500);
    expect((selected.rejectedByReason.zenith_limit ?? 0) + (selected.rejectedByReason.excluded_window ?? 0)).toBe(3500);
  });

  it('leaves out samples stored as anisotropic unless the filter is off, and carries τ0 and θ0 of the accepted samples', () => {
    const columns: StoredSampleColumns = {
      count: 4,
      timeMs: Float64Array.from([0, 1, 2, 3], (index) => START_MS + index * MINUTE_MS),
      seeingArcsec: Float64Array.from([0.7, 1.6, 0.8, 0.9]),
      zenithDeg: Float64Array.from([10, 10, 10, 70]),
      sunAltDeg: Float64Array.from([-30, -30, -30, -30]),
      flux: Float64Array.from([Number.NaN, Number.NaN, Number.NaN, Number.NaN]),
      anisotropic: Uint8Array.from([0, 1, 0, 0]),
      tau0Ms: Float64Array.from([4, 5, Number.NaN, 7]),
      theta0Arcsec: Float64Array.from([2, 2.1, 2.2, 2.3]),
    };
    const sortedRun = [{ columns, exclusions: [], seeingSort: sortPositive(columns.seeingArcsec) }];
    const leftOut = selectSamples(sortedRun, { fromMs: null, toMs: null, filters: DEFAULT_FILTERS });
    expect(Array.from(leftOut.seeingArcsec)).toEqual([0.7, 0.8]);
    expect(leftOut.rejectedByReason).toEqual({ anisotropic: 1, zenith_limit: 1 });
    expect(Array.from(leftOut.tau0Ms ?? [])).toEqual([4, Number.NaN]);
    expect(Array.from(leftOut.theta0Arcsec ?? [])).toEqual([2, 2.2]);
    const kept = selectSamples(sortedRun, { fromMs: null, toMs: null, filters: { ...DEFAULT_FILTERS, leaveOutAnisotropic: false } });
    expect(Array.from(kept.seeingArcsec)).toEqual([0.7, 1.6, 0.8]);
    // runs without the columns give none
    expect(selectSamples(runs, query).tau0Ms).toBeUndefined();
  });
});
