import { DEFAULT_FILTERS, filterReason, summarizeSeeing, type FilterSettings } from "@calmcrest/seeing-stats";
import { instantMs, RESPONSE_SET_LABELS, type SeeingStatistics, type SiteSummaryBrief, type SummaryQuery, type SummaryResponse, type SummaryScope } from "@calmcrest/contracts";
import type { CampaignRow, SiteRow } from "../access/access.server";
import { lowerBoundTime, type CampaignColumns, type ExclusionWindow, type SampleCache } from "./sample-cache.server";

const DAY_MS = 86_400_000;

export interface ResolvedQuery {
  fromMs: number | null;
  toMs: number | null;
  filters: FilterSettings;
  from: string | null;
  to: string | null;
}

/** Query parameters with the engine's defaults filled in. A bare `to` date includes that whole day. */
export function resolveQuery(query: SummaryQuery): ResolvedQuery {
  const filters: FilterSettings = {
    maxZenithDeg: query.maxZenithDeg ?? DEFAULT_FILTERS.maxZenithDeg,
    sunMaxDeg: query.sunMaxDeg ?? DEFAULT_FILTERS.sunMaxDeg,
    minFlux: query.minFlux ?? DEFAULT_FILTERS.minFlux,
  };
  const fromMs = query.from ? instantMs(query.from) : null;
  const toMs = query.to ? instantMs(query.to) + (query.to.length === 10 ? DAY_MS : 0) : null;
  return { fromMs, toMs, filters, from: query.from ?? null, to: query.to ?? null };
}

/** Counts of rows rejected at ingest (they have no usable time, so they only join summaries without a time range). */
export interface IngestRejections {
  rejected: number;
  rejectedByReason: Record<string, number>;
}

export interface SelectedSamples {
  timeMs: Float64Array;
  seeingArcsec: Float64Array;
  stored: number;
  rejectedByReason: Record<string, number>;
}

/**
 * Visits the accepted samples of the campaigns for the query, campaign by campaign in time order: time range
 * first, then exclusion windows, then the engine's filterReason with the query's settings. Every sample left out
 * is counted under its reason. Returns the number of stored samples in the time range and the reasons.
 */
export function forEachAccepted(
  cache: SampleCache,
  campaignIds: readonly number[],
  resolved: ResolvedQuery,
  visit: (columns: CampaignColumns, index: number) => void,
): { stored: number; rejectedByReason: Record<string, number> } {
  const rejectedByReason: Record<string, number> = {};
  const reject = (reason: string) => {
    rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + 1;
  };
  // One probe object reused for every sample: filterReason only reads these three fields.
  const probe: { zenithDeg: number; sunAltDeg: number | null; flux: number | null } = { zenithDeg: 0, sunAltDeg: null, flux: null };
  let stored = 0;
  for (const campaignId of campaignIds) {
    const columns = cache.columns(campaignId);
    const exclusions = cache.exclusions(campaignId);
    const start = resolved.fromMs === null ? 0 : lowerBoundTime(columns.timeMs, columns.count, resolved.fromMs);
    const end = Math.max(start, resolved.toMs === null ? columns.count : lowerBoundTime(columns.timeMs, columns.count, resolved.toMs));
    stored += end - start;
    for (let index = start; index < end; index += 1) {
      const time = columns.timeMs[index] ?? 0;
      if (insideAny(exclusions, time)) {
        reject("excluded_window");
        continue;
      }
      const sunAltDeg = columns.sunAltDeg[index] ?? Number.NaN;
      const flux = columns.flux[index] ?? Number.NaN;
      probe.zenithDeg = columns.zenithDeg[index] ?? Number.NaN;
      probe.sunAltDeg = Number.isNaN(sunAltDeg) ? null : sunAltDeg;
      probe.flux = Number.isNaN(flux) ? null : flux;
      const reason = filterReason(probe, resolved.filters);
      if (reason !== null) {
        reject(reason);
        continue;
      }
      visit(columns, index);
    }
  }
  return { stored, rejectedByReason };
}

/** Whether the time falls in one of the windows (from inclusive, to exclusive). A plain loop: this runs per sample. */
function insideAny(windows: readonly ExclusionWindow[], timeMs: number): boolean {
  for (const window of windows) if (timeMs >= window.fromMs && timeMs < window.toMs) return true;
  return false;
}

/** The accepted samples as the engine's columns (time and seeing), with the counts of the rest. */
export function selectSamples(cache: SampleCache, campaignIds: readonly number[], resolved: ResolvedQuery): SelectedSamples {
  let capacity = 0;
  for (const campaignId of campaignIds) capacity += cache.columns(campaignId).count;
  const timeMs = new Float64Array(capacity);
  const seeingArcsec = new Float64Array(capacity);
  let accepted = 0;
  const { stored, rejectedByReason } = forEachAccepted(cache, campaignIds, resolved, (columns, index) => {
    timeMs[accepted] = columns.timeMs[index] ?? 0;
    seeingArcsec[accepted] = columns.seeingArcsec[index] ?? Number.NaN;
    accepted += 1;
  });
  return { timeMs: timeMs.subarray(0, accepted), seeingArcsec: seeingArcsec.subarray(0, accepted), stored, rejectedByReason };
}

export interface SummaryInput {
  kind: "campaign" | "site";
  site: SiteRow;
  campaigns: CampaignRow[];
  resolved: ResolvedQuery;
  ingestRejections: IngestRejections;
}

/** The summary answer: the analyzer's JSON fields (computed fresh by the engine) plus what was summarised. */
export function buildSummary(cache: SampleCache, input: SummaryInput): SummaryResponse {
  const { site, campaigns, resolved } = input;
  const selected = selectSamples(
    cache,
    campaigns.map((campaign) => campaign.id),
    resolved,
  );
  // Rows rejected at ingest have no usable time, so they can only be counted when no time range is asked for.
  const includesIngestRejections = resolved.fromMs === null && resolved.toMs === null;
  const rejectedByReason: Record<string, number> = { ...selected.rejectedByReason };
  let ingestRejected = 0;
  if (includesIngestRejections) {
    for (const [reason, count] of Object.entries(input.ingestRejections.rejectedByReason)) {
      rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + count;
    }
    ingestRejected = input.ingestRejections.rejected;
  }
  const accepted = selected.seeingArcsec.length;
  const read = selected.stored + ingestRejected;
  const exclusions = campaigns.flatMap((campaign) =>
    cache.exclusions(campaign.id).map((window) => ({
      from: new Date(window.fromMs).toISOString(),
      to: new Date(window.toMs).toISOString(),
      reason: window.reason,
    })),
  );
  const scope: SummaryScope = {
    kind: input.kind,
    siteId: site.id,
    siteName: site.name,
    campaigns: campaigns.map((campaign) => ({
      id: campaign.id,
      name: campaign.name,
      heightAboveGroundM: campaign.height_above_ground_m,
      response: campaign.response,
      wavelengthNm: campaign.wavelength_nm,
    })),
    filters: { from: resolved.from, to: resolved.to, ...resolved.filters },
    exclusions,
    samples: { read, accepted, rejected: read - accepted, rejectedByReason },
    includesIngestRejections,
  };
  const statistics: SeeingStatistics | null = summarizeSeeing(
    { timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec },
    { longitudeDeg: site.longitude },
  );
  if (!statistics) return { ...scope, empty: true };
  return { ...scope, empty: false, ...statistics };
}

/** The short summary for the site list (default filters, no time range), memoised until the samples change. */
export function siteBrief(cache: SampleCache, site: SiteRow, campaignIds: readonly number[]): SiteSummaryBrief | null {
  const key = `${site.id}:${campaignIds.join(",")}`;
  if (cache.briefs.has(key)) return cache.briefs.get(key) ?? null;
  const resolved = resolveQuery({});
  const selected = selectSamples(cache, campaignIds, resolved);
  // The list needs no interval, so the bootstrap is kept tiny; the percentiles are exact either way.
  const statistics = summarizeSeeing(
    { timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec },
    { longitudeDeg: site.longitude, bootstrapReplicates: 10 },
  );
  const brief: SiteSummaryBrief | null = statistics
    ? { samples: selected.seeingArcsec.length, nights: statistics.nights, median: statistics.seeing.median, p25: statistics.seeing.p25, p75: statistics.seeing.p75 }
    : null;
  cache.briefs.set(key, brief);
  return brief;
}

export function responseName(campaign: CampaignRow): string {
  return RESPONSE_SET_LABELS[campaign.response];
}
