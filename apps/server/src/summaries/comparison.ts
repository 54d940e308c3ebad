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
import type { SampleCache } from "./sample-cache.server";
import { resolveQuery, selectSamples, type ResolvedQuery } from "./summarize.server";

// Sites (or campaigns) side by side, the part that runs in a summary worker: `computeComparison` is a pure function
// of the selected samples and the settings, and `runComparisonTask` selects each row's samples from the worker's
// sample cache first. Access checks and everything read from the store happen before, on the main thread
// (compare.server.ts), and arrive in the task's input.

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
export function computeComparison(items: readonly ComparisonItemInput[], settings: ComparisonSettings, pairFigures?: readonly PairFigures[] | "omit"): ComparisonResponse {
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
      // The summary's own warnings first; a comparison warning the summary already gave (too few nights) once only.
      warnings: [...(summary?.warnings ?? []), ...(warnings.sites[index] ?? []).filter((warning) => !(summary?.warnings ?? []).some((own) => own.code === warning.code))],
    };
  });

  // The pairs' figures: given (computed by another worker at the same time), left out, or computed here.
  const figures = pairFigures === "omit" ? null : (pairFigures ?? computeComparisonPairs(items, settings));
  const pairs: ComparisonPair[] = warnings.pairs.map(({ a, b, warnings: pairWarnings }, index) => {
    const base = { a, b, aKey: items[a]?.key ?? "", bKey: items[b]?.key ?? "", warnings: pairWarnings };
    const figure = figures?.[index];
    return { ...base, paired: figure?.paired ?? null, unpaired: figure?.unpaired ?? null };
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
      standard:
        filters.maxZenithDeg === DEFAULT_FILTERS.maxZenithDeg &&
        filters.sunMaxDeg === DEFAULT_FILTERS.sunMaxDeg &&
        filters.minFlux === DEFAULT_FILTERS.minFlux &&
        filters.leaveOutAnisotropic !== false,
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

/** The paired and unpaired figures of one pair of rows (null when a row has no samples). */
export type PairFigures = Pick<ComparisonPair, "paired" | "unpaired">;

/** Every pair of rows a < b, in the order comparisonWarnings lists them (a, then b, ascending). */
function pairIndices(rowCount: number): { a: number; b: number }[] {
  const pairs: { a: number; b: number }[] = [];
  for (let a = 0; a < rowCount; a += 1) for (let b = a + 1; b < rowCount; b += 1) pairs.push({ a, b });
  return pairs;
}

/**
 * Every pair's paired figures on common nights and unpaired figures, in pair order: the part of computeComparison
 * that does not need the rows' summaries, so another worker can compute it at the same time (summary-service's
 * split). computeComparison(items, settings, computeComparisonPairs(items, settings)) is computeComparison(items, settings).
 */
export function computeComparisonPairs(items: readonly ComparisonItemInput[], settings: Pick<ComparisonSettings, "pairing">): PairFigures[] {
  const matchedBinMinutes = settings.pairing === "bins" ? PAIRING_BIN_MINUTES : undefined;
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
  return pairIndices(items.length).map(({ a, b }): PairFigures => {
    const itemA = items[a];
    const itemB = items[b];
    if (!itemA || !itemB || itemA.selected.seeingArcsec.length === 0 || itemB.selected.seeingArcsec.length === 0) {
      return { paired: null, unpaired: null };
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
}

/** A row as the main thread resolved it for the caller: who it is, its visible campaigns and how they were measured. */
export interface ComparisonRowInput {
  key: string;
  label: string;
  site: ComparisonRow["site"];
  campaignId: number | null;
  campaignIds: number[];
  campaigns: ComparedCampaign[];
}

/** The input of the "comparison" summary task (tasks.server.ts): structured-cloneable, everything but the samples. */
export interface ComparisonTaskInput {
  kind: ComparisonResponse["kind"];
  rows: ComparisonRowInput[];
  query: ComparisonQuery;
  /**
   * Only a part, when two workers share the comparison (summary-service's split): "rows" gives the whole answer
   * with every pair's figures left null, "pairs" only the pairs' figures (PairFigures[]); mergeComparisonParts
   * joins them. Absent: the whole answer.
   */
  part?: "rows" | "pairs";
}

/** The answer of a "rows" part with the pairs' figures of the "pairs" part put in: what one worker computing both gives. */
export function mergeComparisonParts(rowsPart: ComparisonResponse, pairsPart: readonly PairFigures[]): ComparisonResponse {
  if (pairsPart.length !== rowsPart.pairs.length) throw new Error(`comparison parts disagree: ${rowsPart.pairs.length} pairs and ${pairsPart.length} pair figures`);
  return { ...rowsPart, pairs: rowsPart.pairs.map((pair, index) => ({ ...pair, paired: pairsPart[index]?.paired ?? null, unpaired: pairsPart[index]?.unpaired ?? null })) };
}

/** Runs in a summary worker: selects each row's samples from the worker's sample cache and computes the comparison (or the part asked for). */
export function runComparisonTask(cache: SampleCache, input: ComparisonTaskInput): ComparisonResponse | PairFigures[] {
  const resolved = resolveQuery(input.query);
  const items: ComparisonItemInput[] = input.rows.map((row) => ({
    key: row.key,
    label: row.label,
    site: row.site,
    campaignId: row.campaignId,
    campaigns: row.campaigns,
    selected: selectSamples(cache, row.campaignIds, resolved),
    summaryContext: { responseSets: row.campaigns.map((campaign) => campaign.responseName), monitorHeightsM: row.campaigns.map((campaign) => campaign.heightAboveGroundM) },
  }));
  const { query } = input;
  const settings: ComparisonSettings = {
    kind: input.kind,
    resolved,
    telescope: { apertureM: query.apertureM ?? null, bandNm: query.bandNm, outerScaleM: query.outerScaleM },
    pairing: query.pairing,
    generatedAt: new Date().toISOString(),
  };
  if (input.part === "pairs") return computeComparisonPairs(items, settings);
  return computeComparison(items, settings, input.part === "rows" ? "omit" : undefined);
}
