import { DEFAULT_FILTERS, filterReason, summarizeSeeingPresorted, type FilterSettings, type SortedSeeing } from "@calmcrest/seeing-stats";
import { instantMs, RESPONSE_SET_LABELS, type SeeingStatistics, type SiteSummaryBrief, type SummaryQuery, type SummaryResponse, type SummaryScope } from "@calmcrest/contracts";
import type { CampaignRow, IngestRejections, SiteRow } from "../store/index";
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

export type { IngestRejections };

export interface SelectedSamples {
  timeMs: Float64Array;
  seeingArcsec: Float64Array;
  /** The engine's sort of seeingArcsec, assembled from the campaigns' cached sorts. */
  presorted: SortedSeeing;
  stored: number;
  rejectedByReason: Record<string, number>;
}

/** Why a stored sample is left out of a summary, as counted in `samples.rejectedByReason`. */
const REJECTION_REASONS = ["excluded_window", "zenith_limit", "sun_above_limit", "low_flux", "anisotropic"] as const;
const NO_REJECTION = 255;

/** One campaign's part of a query: its stored samples in the time range, and which of them are accepted. */
interface CampaignSelection {
  columns: CampaignColumns;
  /** Stored samples in the time range. */
  stored: number;
  /** Indices of the accepted samples, ascending (time order). */
  accepted: Uint32Array;
  /** How many samples each reason of REJECTION_REASONS left out. */
  rejectedCounts: Int32Array;
  /** Reason codes in the order first met, so the reasons are listed as a sample-by-sample count would list them. */
  reasonsMet: number[];
}

/**
 * The accepted samples of one campaign for the query: time range first, then exclusion windows, then the engine's
 * filterReason with the query's settings. Every sample left out is counted under its reason.
 */
function selectCampaign(cache: SampleCache, campaignId: number, resolved: ResolvedQuery): CampaignSelection {
  const columns = cache.columns(campaignId);
  const exclusions = cache.exclusions(campaignId);
  const start = resolved.fromMs === null ? 0 : lowerBoundTime(columns.timeMs, columns.count, resolved.fromMs);
  const end = Math.max(start, resolved.toMs === null ? columns.count : lowerBoundTime(columns.timeMs, columns.count, resolved.toMs));
  const accepted = new Uint32Array(end - start);
  const rejectedCounts = new Int32Array(REJECTION_REASONS.length);
  const reasonsMet: number[] = [];
  // One probe object reused for every sample: filterReason only reads these three fields.
  const probe: { zenithDeg: number; sunAltDeg: number | null; flux: number | null } = { zenithDeg: 0, sunAltDeg: null, flux: null };
  let acceptedCount = 0;
  for (let index = start; index < end; index += 1) {
    let reasonCode = NO_REJECTION;
    if (insideAny(exclusions, columns.timeMs[index] ?? 0)) reasonCode = 0;
    else {
      const sunAltDeg = columns.sunAltDeg[index] ?? Number.NaN;
      const flux = columns.flux[index] ?? Number.NaN;
      probe.zenithDeg = columns.zenithDeg[index] ?? Number.NaN;
      probe.sunAltDeg = Number.isNaN(sunAltDeg) ? null : sunAltDeg;
      probe.flux = Number.isNaN(flux) ? null : flux;
      const reason = filterReason(probe, resolved.filters);
      if (reason !== null) reasonCode = REJECTION_REASONS.indexOf(reason);
    }
    if (reasonCode === NO_REJECTION) {
      accepted[acceptedCount] = index;
      acceptedCount += 1;
    } else {
      const before = rejectedCounts[reasonCode] ?? 0;
      if (before === 0) reasonsMet.push(reasonCode);
      rejectedCounts[reasonCode] = before + 1;
    }
  }
  return { columns, stored: end - start, accepted: accepted.subarray(0, acceptedCount), rejectedCounts, reasonsMet };
}

function selectCampaigns(cache: SampleCache, campaignIds: readonly number[], resolved: ResolvedQuery): { selections: CampaignSelection[]; stored: number; rejectedByReason: Record<string, number> } {
  const selections = campaignIds.map((campaignId) => selectCampaign(cache, campaignId, resolved));
  const rejectedByReason: Record<string, number> = {};
  let stored = 0;
  for (const selection of selections) {
    stored += selection.stored;
    for (const code of selection.reasonsMet) {
      const reason = REJECTION_REASONS[code] ?? "excluded_window";
      rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + (selection.rejectedCounts[code] ?? 0);
    }
  }
  return { selections, stored, rejectedByReason };
}

/**
 * Visits the accepted samples of the campaigns for the query, campaign by campaign in time order (see
 * selectCampaign). Returns the number of stored samples in the time range and the reasons for the rest.
 */
export function forEachAccepted(
  cache: SampleCache,
  campaignIds: readonly number[],
  resolved: ResolvedQuery,
  visit: (columns: CampaignColumns, index: number) => void,
): { stored: number; rejectedByReason: Record<string, number> } {
  const { selections, stored, rejectedByReason } = selectCampaigns(cache, campaignIds, resolved);
  for (const { columns, accepted } of selections) for (const index of accepted) visit(columns, index);
  return { stored, rejectedByReason };
}

/** Whether the time falls in one of the windows (from inclusive, to exclusive). A plain loop: this runs per sample. */
function insideAny(windows: readonly ExclusionWindow[], timeMs: number): boolean {
  for (const window of windows) if (timeMs >= window.fromMs && timeMs < window.toMs) return true;
  return false;
}

/**
 * The accepted samples as the engine's columns (time and seeing; campaign after campaign, each in time order), with
 * the counts of the rest, and their seeing sort taken from each campaign's cached sort instead of sorting again:
 * walking a campaign's sorted order and keeping the accepted samples gives them sorted, equal values still in
 * index order; several campaigns are merged, equal values going to the earlier campaign, which is where they sit
 * in the concatenated columns. So `presorted` is exactly what the engine's own sort would give.
 */
export function selectSamples(cache: SampleCache, campaignIds: readonly number[], resolved: ResolvedQuery): SelectedSamples {
  const { selections, stored, rejectedByReason } = selectCampaigns(cache, campaignIds, resolved);
  let acceptedCount = 0;
  for (const selection of selections) acceptedCount += selection.accepted.length;
  const timeMs = new Float64Array(acceptedCount);
  const seeingArcsec = new Float64Array(acceptedCount);
  const sortedRuns: { order: Uint32Array; sorted: Float64Array }[] = [];
  let firstPosition = 0;
  selections.forEach((selection, slot) => {
    copySelected(selection, firstPosition, timeMs, seeingArcsec);
    sortedRuns.push(sortedSelection(cache.seeingSort(campaignIds[slot] ?? 0), selection, firstPosition));
    firstPosition += selection.accepted.length;
  });
  return { timeMs, seeingArcsec, presorted: mergeSortedRuns(sortedRuns, acceptedCount), stored, rejectedByReason };
}

function copySelected(selection: CampaignSelection, firstPosition: number, timeMs: Float64Array, seeingArcsec: Float64Array): void {
  const { columns, accepted } = selection;
  for (let slot = 0; slot < accepted.length; slot += 1) {
    const index = accepted[slot] ?? 0;
    timeMs[firstPosition + slot] = columns.timeMs[index] ?? 0;
    seeingArcsec[firstPosition + slot] = columns.seeingArcsec[index] ?? Number.NaN;
  }
}

/** The campaign's accepted samples in seeing order, as positions in the concatenated columns. */
function sortedSelection(campaignSort: SortedSeeing, selection: CampaignSelection, firstPosition: number): SortedSeeing {
  const { accepted, columns } = selection;
  const positionOf = new Int32Array(columns.count).fill(-1);
  for (let slot = 0; slot < accepted.length; slot += 1) positionOf[accepted[slot] ?? 0] = firstPosition + slot;
  const order = new Uint32Array(accepted.length);
  const sorted = new Float64Array(accepted.length);
  let kept = 0;
  for (let rank = 0; rank < campaignSort.order.length; rank += 1) {
    const position = positionOf[campaignSort.order[rank] ?? 0] ?? -1;
    if (position >= 0) {
      order[kept] = position;
      sorted[kept] = campaignSort.sorted[rank] ?? Number.NaN;
      kept += 1;
    }
  }
  return { order, sorted };
}

/** Merges sorted runs (run r before run r + 1 in the columns) into one stable sort. */
function mergeSortedRuns(runs: SortedSeeing[], total: number): SortedSeeing {
  const [onlyRun] = runs;
  if (runs.length === 1 && onlyRun) return onlyRun;
  const order = new Uint32Array(total);
  const sorted = new Float64Array(total);
  const heads = new Int32Array(runs.length);
  for (let position = 0; position < total; position += 1) {
    // The few runs are scanned for the smallest head; strict < keeps ties with the earliest run.
    let best = -1;
    let bestValue = Number.POSITIVE_INFINITY;
    runs.forEach((run, slot) => {
      const head = heads[slot] ?? 0;
      if (head < run.sorted.length && (best === -1 || (run.sorted[head] ?? Number.POSITIVE_INFINITY) < bestValue)) {
        best = slot;
        bestValue = run.sorted[head] ?? Number.POSITIVE_INFINITY;
      }
    });
    const run = runs[best];
    const head = heads[best] ?? 0;
    order[position] = run?.order[head] ?? 0;
    sorted[position] = bestValue;
    heads[best] = head + 1;
  }
  return { order, sorted };
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
  const resolved = resolveQuery({});
  const selected = selectSamples(cache, campaignIds, resolved);
  // The list needs no interval, so the bootstrap is kept tiny; the percentiles are exact either way.
  const statistics = summarizeSeeingPresorted(
    { timeMs: selected.timeMs, seeingArcsec: selected.seeingArcsec },
    selected.presorted,
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
