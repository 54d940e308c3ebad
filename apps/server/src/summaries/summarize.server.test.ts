import { describe, expect, it } from "vitest";
import { createRandom, sortPositive, summarizeSeeing, summarizeSeeingPresorted } from "@calmcrest/seeing-stats";
import type { CampaignColumns, ExclusionWindow, SampleCache } from "./sample-cache.server";
import { resolveQuery, selectSamples } from "./summarize.server";

const MINUTE_MS = 60_000;

/** An invented campaign's cached columns: one sample a minute, seeing on a coarse grid so values tie often. */
function campaignColumns(seed: number, count: number, startMs: number): CampaignColumns {
  const random = createRandom(seed);
  const column = (value: (index: number) => number) => Float64Array.from({ length: count }, (_, index) => value(index));
  return {
    count,
    timeMs: column((index) => startMs + index * MINUTE_MS),
    seeingArcsec: column(() => Math.round((0.4 + random()) * 40) / 40),
    zenithDeg: column(() => random() * 70),
    sunAltDeg: column(() => -40 + random() * 30),
    flux: column(() => (random() < 0.5 ? Number.NaN : random() * 1000)),
    seeingLongArcsec: column(() => Number.NaN),
    seeingTransArcsec: column(() => Number.NaN),
  };
}

/** The two SampleCache methods selectSamples uses, over fixed columns (no database). */
function fakeCache(campaigns: Map<number, { columns: CampaignColumns; exclusions: ExclusionWindow[] }>): SampleCache {
  const sorts = new Map<number, ReturnType<typeof sortPositive>>();
  const entry = (campaignId: number) => {
    const found = campaigns.get(campaignId);
    if (!found) throw new Error(`no campaign ${campaignId}`);
    return found;
  };
  const cache = {
    columns: (campaignId: number) => entry(campaignId).columns,
    exclusions: (campaignId: number) => entry(campaignId).exclusions,
    seeingSort: (campaignId: number) => {
      const sort = sorts.get(campaignId) ?? sortPositive(entry(campaignId).columns.seeingArcsec);
      sorts.set(campaignId, sort);
      return sort;
    },
  };
  return cache as unknown as SampleCache;
}

describe("selectSamples", () => {
  it("assembles from the campaigns' cached sorts exactly the sort the engine would make of the selected samples", () => {
    const startMs = Date.UTC(2025, 2, 1, 2);
    const first = campaignColumns(1, 3000, startMs);
    // The second campaign overlaps the first in time and in values, so the merge meets ties across campaigns.
    const second = campaignColumns(2, 2000, startMs + 500 * MINUTE_MS);
    const exclusion = { fromMs: startMs + 100 * MINUTE_MS, toMs: startMs + 400 * MINUTE_MS, reason: "dome maintenance" };
    const cache = fakeCache(
      new Map([
        [7, { columns: first, exclusions: [exclusion] }],
        [9, { columns: second, exclusions: [] }],
      ]),
    );
    for (const query of [{}, { maxZenithDeg: 45, minFlux: 200 }, { from: "2025-03-02", sunMaxDeg: -25 }]) {
      for (const campaignIds of [[7], [9, 7], [7, 9]]) {
        const selected = selectSamples(cache, campaignIds, resolveQuery(query));
        const expected = sortPositive(selected.seeingArcsec);
        expect(Array.from(selected.presorted.order)).toEqual(Array.from(expected.order));
        expect(Array.from(selected.presorted.sorted)).toEqual(Array.from(expected.sorted));
      }
    }
    const withFilters = selectSamples(cache, [7, 9], resolveQuery({ maxZenithDeg: 45 }));
    expect(withFilters.rejectedByReason.excluded_window).toBe(300);
    expect(withFilters.rejectedByReason.zenith_limit).toBeGreaterThan(0);
    expect(withFilters.stored).toBe(5000);
    expect(withFilters.seeingArcsec.length + Object.values(withFilters.rejectedByReason).reduce((sum, count) => sum + count, 0)).toBe(5000);
    // the summary from the assembled sort is the one the engine gives when it sorts by itself
    const columns = { timeMs: withFilters.timeMs, seeingArcsec: withFilters.seeingArcsec };
    expect(summarizeSeeingPresorted(columns, withFilters.presorted, { longitudeDeg: -70 })).toEqual(summarizeSeeing(columns, { longitudeDeg: -70 }));
  });
});
