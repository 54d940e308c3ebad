import { nightLabel } from "@calmcrest/seeing-stats";
import type { SamplePoint, SampleSeries, SamplesQuery } from "@calmcrest/contracts";
import { forEachAccepted, resolveQuery } from "./summarize.server";
import type { SampleCache } from "./sample-cache.server";

const DEFAULT_MAX_POINTS = 2000;
const HOUR_MS = 3_600_000;
const DAY_MS = 86_400_000;

/**
 * Accepted samples (after time range, exclusions and filters) for charts of single samples, in time order,
 * optionally of one night only (the engine's nightLabel at the site's longitude). More than maxPoints are
 * thinned evenly; `total` says how many passed.
 */
export function sampleSeries(cache: SampleCache, campaignIds: readonly number[], longitudeDeg: number, query: SamplesQuery): SampleSeries {
  const resolved = resolveQuery(query);
  const night = query.night ?? null;
  if (night !== null) {
    // A night D runs from local noon of D to local noon of D+1 (local solar time); one extra hour each side
    // keeps the window safe, and nightLabel below decides exactly.
    const noonUtcMs = Date.parse(`${night}T12:00:00Z`) - (longitudeDeg / 15) * HOUR_MS;
    const fromMs = noonUtcMs - HOUR_MS;
    const toMs = noonUtcMs + DAY_MS + HOUR_MS;
    resolved.fromMs = resolved.fromMs === null ? fromMs : Math.max(resolved.fromMs, fromMs);
    resolved.toMs = resolved.toMs === null ? toMs : Math.min(resolved.toMs, toMs);
  }
  const points: SamplePoint[] = [];
  forEachAccepted(cache, campaignIds, resolved, (columns, index) => {
    const timeMs = columns.timeMs[index] ?? 0;
    if (night !== null && nightLabel(timeMs, longitudeDeg) !== night) return;
    // The series task syncs with the axis columns (tasks.server.ts: axes); absent, the axes are unknown.
    const seeingLong = columns.seeingLongArcsec?.[index] ?? Number.NaN;
    const seeingTrans = columns.seeingTransArcsec?.[index] ?? Number.NaN;
    points.push({
      timeMs,
      seeingArcsec: columns.seeingArcsec[index] ?? Number.NaN,
      seeingLongArcsec: Number.isNaN(seeingLong) ? null : seeingLong,
      seeingTransArcsec: Number.isNaN(seeingTrans) ? null : seeingTrans,
    });
  });
  // Several campaigns of a site are visited one after another; charts want one time order.
  if (campaignIds.length > 1) points.sort((left, right) => left.timeMs - right.timeMs);
  const maxPoints = query.maxPoints ?? DEFAULT_MAX_POINTS;
  const total = points.length;
  if (total <= maxPoints) return { night, total, samples: points };
  const thinned: SamplePoint[] = [];
  for (let slot = 0; slot < maxPoints; slot += 1) {
    const point = points[Math.round((slot * (total - 1)) / (maxPoints - 1))];
    if (point) thinned.push(point);
  }
  return { night, total, samples: thinned };
}
