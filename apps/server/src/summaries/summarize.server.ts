import {
  DEFAULT_FILTERS,
  selectRuns,
  selectSamples as selectSampleRuns,
  summarizeSeeingPresorted,
  type FilterSettings,
  type SelectedSamples,
} from "@calmcrest/seeing-stats";
import { instantMs, type SeeingStatistics, type SiteSummaryBrief, type SummaryQuery, type SummaryResponse, type SummaryScope } from "@calmcrest/contracts";
import type { CampaignRow, IngestRejections, SiteRow } from "../store/index";
import type { CampaignColumns, SampleCache } from "./sample-cache.server";

// Summaries from the cached sample columns: the server only loads columns (SampleCache); which samples count
// (time range, exclusions, filters) and their merged sort are the engine's selectSamples.

const DAY_MS = 86_400_000;

export type { IngestRejections, SelectedSamples };

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

/** The campaigns' cached columns and exclusion windows, as the engine's sample runs. */
function runsOf(cache: SampleCache, campaignIds: readonly number[]) {
  return campaignIds.map((campaignId) => ({ columns: cache.columns(campaignId), exclusions: cache.exclusions(campaignId) }));
}

/**
 * Visits the accepted samples of the campaigns for the query, campaign by campaign in time order (the engine's
 * selectRuns). Returns the number of stored samples in the time range and the reasons for the rest.
 */
export function forEachAccepted(
  cache: SampleCache,
  campaignIds: readonly number[],
  resolved: ResolvedQuery,
  visit: (columns: CampaignColumns, index: number) => void,
): { stored: number; rejectedByReason: Record<string, number> } {
  const { selections, stored, rejectedByReason } = selectRuns(runsOf(cache, campaignIds), resolved);
  for (const { columns, accepted } of selections) for (const index of accepted) visit(columns, index);
  return { stored, rejectedByReason: { ...rejectedByReason } };
}

/** The accepted samples of the campaigns with their seeing sort assembled from each campaign's cached sort (the engine's selectSamples). */
export function selectSamples(cache: SampleCache, campaignIds: readonly number[], resolved: ResolvedQuery): SelectedSamples {
  const runs = campaignIds.map((campaignId) => ({
    columns: cache.columns(campaignId),
    exclusions: cache.exclusions(campaignId),
    seeingSort: cache.seeingSort(campaignId),
  }));
  return selectSampleRuns(runs, resolved);
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
  const statistics: SeeingStatistics | null = summarizeSeeingPresorted(
    { timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec },
    selected.presorted,
    { longitudeDeg: site.longitude },
  );
  if (!statistics) return { ...scope, empty: true };
  return { ...scope, empty: false, ...statistics };
}

/** The short summary for the site list (default filters, no time range), memoised until the samples change. */
export function siteBrief(cache: SampleCache, site: SiteRow, campaignIds: readonly number[]): SiteSummaryBrief | null {
  const key = `${site.id}:${campaignIds.join(",")}`;
  if (cache.briefs.has(key)) return cache.briefs.get(key) ?? null;
  const brief = computeSiteBrief(cache, site, campaignIds);
  cache.briefs.set(key, brief);
  return brief;
}

/** The short summary for the site list, computed fresh (the summary service caches it by data version). */
export function computeSiteBrief(cache: SampleCache, site: SiteRow, campaignIds: readonly number[]): SiteSummaryBrief | null {
  const resolved = resolveQuery({});
  const selected = selectSamples(cache, campaignIds, resolved);
  // The list needs no interval, so the bootstrap is kept tiny; the percentiles are exact either way.
  const statistics = summarizeSeeingPresorted(
    { timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec },
    selected.presorted,
    { longitudeDeg: site.longitude, bootstrapReplicates: 10 },
  );
  return statistics
    ? { samples: selected.seeingArcsec.length, nights: statistics.nights, median: statistics.seeing.median, p25: statistics.seeing.p25, p75: statistics.seeing.p75 }
    : null;
}
