import {
  briefSeeing,
  checkLongitudeSign,
  DEFAULT_FILTERS,
  summaryWarnings,
  RESPONSE_SET_NAMES,
  lowerBoundTime,
  selectRuns,
  selectSamples as selectSampleRuns,
  summarizeSeeingPresorted,
  type FilterSettings,
  type SelectedSamples,
  type SummaryOptions,
} from "@calmcrest/seeing-stats";
import { instantMs, type SeeingStatistics, type SiteSummaryBrief, type SummaryGroup, type SummaryQuery, type SummaryResponse, type SummaryScope } from "@calmcrest/contracts";
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
    leaveOutAnisotropic: query.keepAnisotropic !== true,
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
    filters: { from: resolved.from, to: resolved.to, ...resolved.filters, leaveOutAnisotropic: resolved.filters.leaveOutAnisotropic !== false },
    exclusions,
    samples: { read, accepted, rejected: read - accepted, rejectedByReason },
    includesIngestRejections,
    warnings: [],
    byCampaign: null,
    byHeight: null,
  };
  const options = summaryOptions(site, campaigns);
  options.context = { ...options.context, longitudeSign: longitudeSignOf(cache, site, campaigns, resolved) };
  const statistics: SeeingStatistics | null = summarizeSeeingPresorted(columnsOf(selected), selected.presorted, options);
  // Campaigns that differ in response set or monitor height are not pooled without a word: the engine warns
  // (mixed_response_sets, mixed_monitor_heights) and the same figures are given per campaign / per height.
  if (new Set(campaigns.map((campaign) => campaign.response)).size > 1) {
    scope.byCampaign = campaigns.map((campaign) =>
      groupFigures(cache, [campaign], resolved, site, `${campaign.name} (${RESPONSE_SET_NAMES[campaign.response]})`),
    );
  }
  const heights = [...new Set(campaigns.map((campaign) => campaign.height_above_ground_m))];
  if (heights.length > 1) {
    scope.byHeight = heights.map((height) =>
      groupFigures(
        cache,
        campaigns.filter((campaign) => campaign.height_above_ground_m === height),
        resolved,
        site,
        height === null ? "monitor height not recorded" : `monitor ${height} m above ground`,
      ),
    );
  }
  if (!statistics) return { ...scope, empty: true, warnings: summaryWarnings({ nights: 0, longitudeGiven: true, context: options.context }) };
  return { ...scope, empty: false, ...statistics };
}

/** The selected samples as the engine's summary columns (τ0 and θ0 when the campaigns logged them). */
function columnsOf(selected: SelectedSamples) {
  return {
    timeMs: selected.timeMs,
    seeingArcsec: selected.seeingArcsec,
    ...(selected.tau0Ms ? { tau0Ms: selected.tau0Ms } : {}),
    ...(selected.theta0Arcsec ? { theta0Arcsec: selected.theta0Arcsec } : {}),
  };
}

/**
 * The site's position for nights, hours and the hemisphere's seasons, and what the engine needs to warn about
 * pooling: the campaigns' response sets and monitor heights. Campaigns always store their wavelength, so no
 * wavelength warning applies on the server.
 */
function summaryOptions(site: SiteRow, campaigns: readonly CampaignRow[]): SummaryOptions {
  return {
    longitudeDeg: site.longitude,
    latitudeDeg: site.latitude,
    context: {
      responseSets: campaigns.map((campaign) => RESPONSE_SET_NAMES[campaign.response]),
      monitorHeightsM: campaigns.map((campaign) => campaign.height_above_ground_m),
    },
  };
}

/** Times spread evenly over the stored samples of the campaigns (in the query's time range) that checkLongitudeSign looks at. */
const SIGN_CHECK_TIMES = 5000;

/**
 * Whether the site's longitude looks like the wrong sign: the sun filter (at the stored sun altitudes) would
 * reject a large share of the campaigns' stored samples that a mirrored longitude would keep (the engine's
 * checkLongitudeSign, on up to 5000 sample times spread evenly over the campaigns).
 */
function longitudeSignOf(cache: SampleCache, site: SiteRow, campaigns: readonly CampaignRow[], resolved: ResolvedQuery) {
  const ranges = campaigns.map((campaign) => {
    const columns = cache.columns(campaign.id);
    const start = resolved.fromMs === null ? 0 : lowerBoundTime(columns.timeMs, columns.count, resolved.fromMs);
    const end = Math.max(start, resolved.toMs === null ? columns.count : lowerBoundTime(columns.timeMs, columns.count, resolved.toMs));
    return { times: columns.timeMs, start, end };
  });
  const total = ranges.reduce((sum, range) => sum + range.end - range.start, 0);
  const picked = new Float64Array(Math.min(total, SIGN_CHECK_TIMES));
  for (let slot = 0; slot < picked.length; slot += 1) {
    let position = Math.floor((slot * total) / picked.length);
    for (const range of ranges) {
      const length = range.end - range.start;
      if (position < length) {
        picked[slot] = range.times[range.start + position] ?? 0;
        break;
      }
      position -= length;
    }
  }
  return checkLongitudeSign(picked, { latitudeDeg: site.latitude, longitudeDeg: site.longitude, elevationM: site.elevation_m }, resolved.filters.sunMaxDeg);
}

/** The headline figures of one group of campaigns with the query's settings. */
function groupFigures(cache: SampleCache, group: readonly CampaignRow[], resolved: ResolvedQuery, site: SiteRow, label: string): SummaryGroup {
  const selected = selectSamples(
    cache,
    group.map((campaign) => campaign.id),
    resolved,
  );
  const statistics = summarizeSeeingPresorted(columnsOf(selected), selected.presorted, { longitudeDeg: site.longitude, latitudeDeg: site.latitude });
  return {
    label,
    campaignIds: group.map((campaign) => campaign.id),
    samples: selected.seeingArcsec.length,
    nights: statistics?.nights ?? 0,
    median: statistics?.seeing.median ?? null,
    p25: statistics?.seeing.p25 ?? null,
    p75: statistics?.seeing.p75 ?? null,
    medianCi95: statistics?.seeing.medianCi95 ?? null,
    interval: statistics?.interval ?? null,
    seasonBalancedMedian: statistics?.seasonBalanced?.medianArcsec ?? null,
  };
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
  // Only the figures the list shows (the full summary's own numbers, without its bootstrap, fit and charts).
  const brief = briefSeeing({ timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec }, selected.presorted, { longitudeDeg: site.longitude });
  return brief ? { samples: brief.samples, nights: brief.nights, median: brief.median, p25: brief.p25, p75: brief.p75 } : null;
}
