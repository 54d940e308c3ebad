import { createRandom, DEFAULT_FILTERS, normalDeviate, sortPositive } from "@calmcrest/seeing-stats";
import { computeComparison, type ComparisonItemInput } from "./comparison";

// A summary worker runs one small comparison of invented samples when it starts, before it says it is ready, so
// the engine's loops (summaries, night bootstraps, pairing) are compiled by V8 before the first request instead of
// during it. It reads nothing stored and keeps nothing: the first real request still finds no samples in memory.

const NIGHTS = 40;
const SAMPLES_PER_NIGHT = 60;

function invented(seed: number, levelArcsec: number): ComparisonItemInput["selected"] {
  const random = createRandom(seed);
  const timeMs = new Float64Array(NIGHTS * SAMPLES_PER_NIGHT);
  const seeingArcsec = new Float64Array(timeMs.length);
  for (let night = 0; night < NIGHTS; night += 1) {
    const level = levelArcsec * Math.exp(0.25 * normalDeviate(random));
    for (let step = 0; step < SAMPLES_PER_NIGHT; step += 1) {
      const index = night * SAMPLES_PER_NIGHT + step;
      timeMs[index] = Date.UTC(2020, 0, 1 + night, 1) + step * 300_000;
      seeingArcsec[index] = level * Math.exp(0.15 * normalDeviate(random));
    }
  }
  return { timeMs, seeingArcsec, presorted: sortPositive(seeingArcsec), stored: timeMs.length, rejectedByReason: {} };
}

/** Computes a 3-row comparison of invented samples and throws the answer away; returns its row count (for tests). */
export function warmUpEngine(): number {
  const items: ComparisonItemInput[] = [0.7, 0.8, 0.9].map((levelArcsec, index) => ({
    key: `warm-up:${index}`,
    label: `Warm-up ${index}`,
    site: { id: -1 - index, name: `Warm-up ${index}`, latitude: -30, longitude: -70, elevationM: 2500 },
    campaignId: null,
    campaigns: [],
    selected: invented(index + 1, levelArcsec),
    summaryContext: {},
  }));
  const comparison = computeComparison(items, {
    kind: "sites",
    resolved: { fromMs: null, toMs: null, from: null, to: null, filters: DEFAULT_FILTERS },
    telescope: { apertureM: null, bandNm: 500, outerScaleM: 25 },
    pairing: "nights",
    generatedAt: new Date(0).toISOString(),
  });
  return comparison.rows.length;
}
