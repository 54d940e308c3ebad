import type { User } from "lucia";
import {
  comparePreparedPaired,
  comparePreparedUnpaired,
  comparisonWarnings,
  DEFAULT_FILTERS,
  describePairedVerdict,
  differenceHistogram,
  percentileSorted,
  predictTelescopeFwhm,
  prepareSite,
  RESPONSE_SET_LABELS,
  RESPONSE_SET_NAMES,
  summarizeSeeingPresorted,
  type SelectedSamples,
  type SummaryContext,
} from "@calmcrest/seeing-stats";
import {
  PAIRING_BIN_MINUTES,
  type ComparedCampaign,
  type ComparisonPair,
  type ComparisonQuery,
  type ComparisonResponse,
  type ComparisonRow,
  type ComparisonRowStatistics,
} from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { HttpError } from "../http/errors";
import { campaignMonitor, siteRef, type CampaignRow, type SiteRow } from "../store/index";
import { resolveQuery, selectSamples, type ResolvedQuery } from "./summarize.server";

// Sites (or campaigns) side by side. Two halves: `computeComparison` is a pure function of the selected samples and
// the settings (no store, no cache; it can run in a worker as it is), and `compareForUser` checks access, loads what
// the rows need and selects their samples from the sample cache.

/** Bootstrap settings of every interval in a comparison (the summaries' own: 1000 replicates, seed 1). */
const REPLICATES = 1000;
const SEED = 1;
/** Points of the thinned cumulative distribution sent per row (every percent). */
const CDF_POINTS = 101;

const UNPAIRED_NOTE =
  "Unpaired: each site's median over its whole window, whatever nights it had. When the campaigns did not run at the same time this mixes seasons and weather with the site; the paired figures on common nights do not.";

/** One row's input to the pure computation: who it is, how its numbers were made, and its selected samples. */
export interface ComparisonItemInput {
  key: string;
  label: string;
  site: ComparisonRow["site"];
  campaignId: number | null;
  campaigns: ComparedCampaign[];
  selected: Pick<SelectedSamples, "timeMs" | "seeingArcsec" | "presorted" | "stored" | "rejectedByReason">;
  /** What summaryWarnings needs to know (pooled response sets, monitor heights). */
  summaryContext: SummaryContext;
}

export interface ComparisonSettings {
  kind: ComparisonResponse["kind"];
  resolved: ResolvedQuery;
  telescope: { apertureM: number | null; bandNm: number; outerScaleM: number };
  pairing: "nights" | "bins";
  generatedAt: string;
}

/**
 * The comparison of 2–6 rows from their selected samples: each row's summary (the engine's summarizeSeeingPresorted),
 * its predicted telescope FWHM (predictTelescopeFwhm), every pair's paired figures on common nights
 * (comparePairedNights, with the verdict in words) beside the unpaired ones (compareSeeing), both through the
 * engine's prepared-site entry points (the same results, each row's nights arranged once for all its pairs), and the comparison's
 * warnings per row, per pair and overall (comparisonWarnings). Pure: the same input gives the same output.
 */
export function computeComparison(items: readonly ComparisonItemInput[], settings: ComparisonSettings): ComparisonResponse {
  const { resolved, telescope } = settings;
  const matchedBinMinutes = settings.pairing === "bins" ? PAIRING_BIN_MINUTES : undefined;
  const summaries = items.map((item) =>
    summarizeSeeingPresorted({ timeMs: item.selected.timeMs, seeingArcsec: item.selected.seeingArcsec }, item.selected.presorted, {
      longitudeDeg: item.site.longitude,
      latitudeDeg: item.site.latitude,
      bootstrapReplicates: REPLICATES,
      seed: SEED,
      context: item.summaryContext,
    }),
  );
  const warnings = comparisonWarnings(
    items.map((item, index) => ({
      name: item.label,
      nightLabels: summaries[index]?.nightly.map((night) => night.night) ?? [],
      monitorHeightsM: item.campaigns.map((campaign) => campaign.heightAboveGroundM),
      responseSets: item.campaigns.map((campaign) => RESPONSE_SET_LABELS[campaign.response]),
    })),
    resolved.filters,
  );

  const rows: ComparisonRow[] = items.map((item, index) => {
    const summary = summaries[index] ?? null;
    let statistics: ComparisonRowStatistics | null = null;
    if (summary) {
      const nightsByMonth = new Map<string, number>();
      for (const night of summary.nightly) nightsByMonth.set(night.night.slice(0, 7), (nightsByMonth.get(night.night.slice(0, 7)) ?? 0) + 1);
      const sorted = item.selected.presorted.sorted;
      statistics = {
        samples: item.selected.seeingArcsec.length,
        nights: summary.nights,
        seeing: {
          mean: summary.seeing.mean,
          p10: summary.seeing.p10,
          p25: summary.seeing.p25,
          median: summary.seeing.median,
          p75: summary.seeing.p75,
          p90: summary.seeing.p90,
          medianCi95: summary.seeing.medianCi95,
        },
        interval: summary.interval,
        r0: summary.r0,
        fractionBelow: summary.fractionBelow,
        fractionBelowCi95: summary.fractionBelowCi95,
        lognormal: summary.lognormal,
        seasonBalanced: summary.seasonBalanced,
        seasons: summary.seasons,
        nightlyMedians: summary.nightlyMedians,
        telescope: predictTelescopeFwhm(summary.seeing, {
          outerScaleM: telescope.outerScaleM,
          wavelengthNm: telescope.bandNm,
          ...(telescope.apertureM === null ? {} : { telescopeDiameterM: telescope.apertureM }),
        }),
        monthly: summary.monthly.map((month) => ({ month: month.month, samples: month.samples, nights: nightsByMonth.get(month.month) ?? 0, median: month.median })),
        // Exact type-7 quantiles at every percent: the curve's shape with a fixed, small number of points.
        cdf: Array.from({ length: CDF_POINTS }, (_, step) => ({ seeingArcsec: percentileSorted(sorted, step / (CDF_POINTS - 1)), fraction: step / (CDF_POINTS - 1) })),
      };
    }
    return {
      key: item.key,
      label: item.label,
      site: item.site,
      campaignId: item.campaignId,
      campaigns: item.campaigns,
      samples: { inWindow: item.selected.stored, accepted: item.selected.seeingArcsec.length, rejectedByReason: { ...item.selected.rejectedByReason } },
      statistics,
      warnings: [...(summary?.warnings ?? []), ...(warnings.sites[index] ?? [])],
    };
  });

  // Each row's samples arranged once for all its pairs (nights, nightly medians, bootstrap replicates).
  const preparedRows = new Map<number, ReturnType<typeof prepareSite>>();
  const prepared = (index: number) => {
    const cached = preparedRows.get(index);
    if (cached) return cached;
    const item = items[index];
    if (!item) throw new Error(`no comparison row ${index}`);
    const made = prepareSite({ timeMs: item.selected.timeMs, seeingArcsec: item.selected.seeingArcsec }, item.selected.presorted, { longitudeDeg: item.site.longitude });
    preparedRows.set(index, made);
    return made;
  };
  const pairs: ComparisonPair[] = warnings.pairs.map(({ a, b, warnings: pairWarnings }) => {
    const itemA = items[a];
    const itemB = items[b];
    const base = { a, b, aKey: itemA?.key ?? "", bKey: itemB?.key ?? "", warnings: pairWarnings };
    if (!itemA || !itemB || itemA.selected.seeingArcsec.length === 0 || itemB.selected.seeingArcsec.length === 0) {
      return { ...base, paired: null, unpaired: null };
    }
    const preparedA = prepared(a);
    const preparedB = prepared(b);
    const paired = comparePreparedPaired(preparedA, preparedB, {
      ...(matchedBinMinutes === undefined ? {} : { matchedBinMinutes }),
      bootstrapReplicates: REPLICATES,
      seed: SEED,
    });
    const unpaired = comparePreparedUnpaired(preparedA, preparedB, { bootstrapReplicates: REPLICATES, seed: SEED });
    const { nights, ...differencePercentiles } = paired.nightlyDifferences;
    return {
      ...base,
      paired: {
        commonNights: paired.commonNights,
        matching: paired.matching,
        binMinutes: paired.binMinutes,
        samplesA: paired.samplesA,
        samplesB: paired.samplesB,
        medianA: paired.medianA,
        medianB: paired.medianB,
        medianDifferenceArcsec: paired.medianDifferenceArcsec,
        ci95: paired.ci95,
        interval: paired.interval,
        nightlyDifferences: differencePercentiles,
        wilcoxon: paired.wilcoxon,
        verdict: paired.verdict,
        sentence: describePairedVerdict(itemA.label, itemB.label, paired),
        histogram: differenceHistogram(nights.map((night) => night.differenceArcsec)),
      },
      unpaired: { ...unpaired, note: UNPAIRED_NOTE },
    };
  });

  const filters = resolved.filters;
  const coefficientSets = [...new Set(items.flatMap((item) => item.campaigns.map((campaign) => campaign.responseName)))];
  return {
    generatedAt: settings.generatedAt,
    kind: settings.kind,
    window: { from: resolved.from, to: resolved.to },
    filters: {
      maxZenithDeg: filters.maxZenithDeg,
      sunMaxDeg: filters.sunMaxDeg,
      minFlux: filters.minFlux,
      standard: filters.maxZenithDeg === DEFAULT_FILTERS.maxZenithDeg && filters.sunMaxDeg === DEFAULT_FILTERS.sunMaxDeg && filters.minFlux === DEFAULT_FILTERS.minFlux,
    },
    telescope: {
      ...telescope,
      method:
        telescope.apertureM === null
          ? `Tokovinin 2002 eq. 19 (von Kármán, L0 = ${telescope.outerScaleM} m, telescope much larger than L0/300), at ${telescope.bandNm} nm and zenith`
          : `ESO ETC-style von Kármán with the Kolb factor for D = ${telescope.apertureM} m (Tokovinin 2002 eq. 19; Martinez et al. 2010), L0 = ${telescope.outerScaleM} m, at ${telescope.bandNm} nm and zenith`,
    },
    pairing: { matching: settings.pairing, binMinutes: matchedBinMinutes ?? null },
    method: {
      seeing: "FWHM at zenith and 500 nm; percentiles linear between order statistics (Hyndman & Fan type 7)",
      interval: "95 % bootstrap over whole nights; none below 10 nights, approximate from 10 to 30",
      seasonBalanced: "weighted median of all samples, each weighted by 1 / (samples in its calendar month): every covered calendar month weighs the same",
      paired:
        settings.pairing === "bins"
          ? `common nights, only the ${PAIRING_BIN_MINUTES}-minute UTC bins in which both monitors ran; difference of pooled medians with a 95 % interval from resampling the common nights jointly`
          : "common nights (each site's local night); difference of pooled medians with a 95 % interval from resampling the common nights jointly",
      signedRank: "Wilcoxon signed-rank on the night-by-night differences of nightly medians (exact up to 50 nights without ties, else normal approximation, as SciPy)",
      unpaired: "difference of pooled medians with independent night bootstraps; Mann–Whitney on nightly medians",
      bootstrap: { replicates: REPLICATES, seed: SEED },
    },
    coefficientSets,
    rows,
    pairs,
    warnings: warnings.general,
  };
}

/** A row's campaigns as the response names them, with their finished uploads and exclusion windows. */
function comparedCampaigns(
  context: AppContext,
  campaigns: CampaignRow[],
  uploads: Awaited<ReturnType<AppContext["store"]["uploads"]["doneOf"]>>,
): ComparedCampaign[] {
  return campaigns.map((campaign) => {
    const monitor = campaignMonitor(campaign);
    return {
      id: campaign.id,
      name: campaign.name,
      heightAboveGroundM: monitor.heightAboveGroundM,
      response: monitor.response,
      responseName: RESPONSE_SET_NAMES[monitor.response],
      apertureMm: monitor.apertureMm,
      baselineMm: monitor.baselineMm,
      wavelengthNm: monitor.wavelengthNm,
      pixelScaleArcsec: monitor.pixelScaleArcsec,
      exposureMs: monitor.exposureMs,
      uploads: uploads.filter((upload) => upload.campaignId === campaign.id).map(({ id, fileName, sha256, samplesAccepted }) => ({ id, fileName, sha256, samplesAccepted })),
      exclusions: context.samples.exclusions(campaign.id).map((window) => ({ from: new Date(window.fromMs).toISOString(), to: new Date(window.toMs).toISOString(), reason: window.reason })),
    };
  });
}

/** Finished comparisons kept per store until the next change of any kind; at most this many. */
const CACHED_COMPARISONS = 16;
const comparisonCaches = new WeakMap<AppContext["store"], Map<string, ComparisonResponse>>();

/**
 * The comparison cache of this store: the same query over the same data gives the same answer, so a repeated
 * comparison (a bookmark opened again, the page's own refetch) is served from here. Every committed change (an
 * ingest, an exclusion, a campaign's settings, membership) clears it, so no answer outlives its data.
 */
function comparisonCache(store: AppContext["store"]): Map<string, ComparisonResponse> {
  const existing = comparisonCaches.get(store);
  if (existing) return existing;
  const cache = new Map<string, ComparisonResponse>();
  store.onChange({ name: "comparison-cache", afterCommit: () => cache.clear() });
  comparisonCaches.set(store, cache);
  return cache;
}

/** A 400 naming the parameter for an id that does not exist (for a caller who can see every site and campaign). */
function unknownId(parameter: "sites" | "campaigns", id: number): HttpError {
  const what = parameter === "sites" ? "site" : "campaign";
  const message = `${parameter}: there is no ${what} with id ${id}. Choose the ${parameter} to compare from the list on the Compare page.`;
  return new HttpError(400, "invalid_input", `The comparison query has invalid fields. ${message}`, { [parameter]: [message] });
}

/**
 * Loads one id's row, with the same access as the site and campaign pages: an item outside the caller's access is a
 * 404 (the same answer as for one that does not exist, so ids cannot be probed). A caller who sees everything (lead,
 * admin) gets a 400 naming the parameter for an id that does not exist, since for them nothing is hidden.
 */
async function orUnknown<T>(user: User, parameter: "sites" | "campaigns", id: number, load: () => Promise<T>): Promise<T> {
  try {
    return await load();
  } catch (thrown) {
    if (thrown instanceof HttpError && thrown.status === 404 && (user.role === "lead" || user.role === "admin")) throw unknownId(parameter, id);
    throw thrown;
  }
}

/**
 * `GET /api/comparisons` for this user: checks access to every site or campaign, selects each row's samples from the
 * sample cache and computes the comparison. Other code (reports) can call it to freeze a comparison.
 */
export async function compareForUser(context: AppContext, user: User, query: ComparisonQuery): Promise<ComparisonResponse> {
  const { store, samples } = context;
  const resolved = resolveQuery(query);
  const kind: ComparisonResponse["kind"] = query.campaigns === undefined ? "sites" : "campaigns";
  const rowsToLoad: { key: string; label: string; site: SiteRow; campaignId: number | null; campaignIds: number[] }[] = [];
  if (query.campaigns !== undefined) {
    for (const campaignId of query.campaigns) {
      const campaign = await orUnknown(user, "campaigns", campaignId, () => store.campaigns.forUser(user, campaignId, "read"));
      const site = await store.sites.require(campaign.site_id);
      rowsToLoad.push({ key: `campaign:${campaign.id}`, label: `${site.name} — ${campaign.name}`, site, campaignId: campaign.id, campaignIds: [campaign.id] });
    }
  } else {
    for (const siteId of query.sites ?? []) {
      const { site, campaignIds } = await orUnknown(user, "sites", siteId, () => store.sites.forUser(user, siteId));
      rowsToLoad.push({ key: `site:${site.id}`, label: site.name, site, campaignId: null, campaignIds });
    }
  }
  const telescope = { apertureM: query.apertureM ?? null, bandNm: query.bandNm, outerScaleM: query.outerScaleM };
  // The rows as this caller sees them (their campaigns) are part of the key, so access never leaks through the cache.
  const cacheKey = JSON.stringify({ kind, rows: rowsToLoad.map((row) => [row.key, row.label, row.campaignIds]), resolved, telescope, pairing: query.pairing });
  const cache = comparisonCache(store);
  const cached = cache.get(cacheKey);
  if (cached) return cached;
  const allCampaignIds = rowsToLoad.flatMap((row) => row.campaignIds);
  const campaignRows = await store.campaigns.listByIds(allCampaignIds);
  const uploads = await store.uploads.doneOf(allCampaignIds);
  const items: ComparisonItemInput[] = rowsToLoad.map((row) => {
    const campaigns = campaignRows.filter((campaign) => row.campaignIds.includes(campaign.id));
    const compared = comparedCampaigns(context, campaigns, uploads);
    return {
      key: row.key,
      label: row.label,
      site: siteRef(row.site),
      campaignId: row.campaignId,
      campaigns: compared,
      selected: selectSamples(samples, row.campaignIds, resolved),
      summaryContext: { responseSets: compared.map((campaign) => campaign.responseName), monitorHeightsM: compared.map((campaign) => campaign.heightAboveGroundM) },
    };
  });
  const comparison = computeComparison(items, { kind, resolved, telescope, pairing: query.pairing, generatedAt: new Date().toISOString() });
  if (cache.size >= CACHED_COMPARISONS) cache.delete(cache.keys().next().value ?? "");
  cache.set(cacheKey, comparison);
  return comparison;
}
