import { z } from "zod";
import type {
  ComparisonWarning,
  DifferenceBin,
  NightIntervalStatus,
  SeasonBalancedMedian,
  SeasonStatistics,
  TelescopePrediction,
  WilcoxonSignedRankResult,
} from "@calmcrest/seeing-stats";
import type { ResponseSetName } from "./campaigns";
import { summaryQueryRangeCheck, summaryQueryShape } from "./summaries";

/** How many sites (or campaigns) one comparison takes. */
export const COMPARISON_MIN_ITEMS = 2;
export const COMPARISON_MAX_ITEMS = 6;
/** Outer scale L0 when the lead enters none (seeing-physics.md §0: 25 m). */
export const DEFAULT_OUTER_SCALE_M = 25;
/** The planned telescope's band when none is entered: the 500 nm every statistic is reduced to. */
export const DEFAULT_BAND_NM = 500;
/** Bin width of the finer pairing ("the hours both monitors ran"). */
export const PAIRING_BIN_MINUTES = 10;

const emptyToUndefined = (value: unknown) => (value === "" || value === undefined ? undefined : value);

/** "1,3,4" → [1, 3, 4]: 2 to 6 different positive whole ids; the message names the parameter. */
const idListSchema = (name: "sites" | "campaigns") =>
  z.preprocess(
    emptyToUndefined,
    z
      .string({ error: `${name} must be a comma-separated list of ids, like ${name}=1,3,4.` })
      .transform((text, context) => {
        const parts = text.split(",").map((part) => part.trim());
        const ids = parts.map(Number);
        if (parts.some((part) => !/^\d+$/.test(part)) || ids.some((id) => !Number.isSafeInteger(id) || id <= 0)) {
          context.addIssue({ code: "custom", message: `${name} must be a comma-separated list of ids, like ${name}=1,3,4; got "${text}".` });
          return z.NEVER;
        }
        if (new Set(ids).size !== ids.length) {
          context.addIssue({ code: "custom", message: `${name} names the same id twice ("${text}"); list each ${name === "sites" ? "site" : "campaign"} once.` });
          return z.NEVER;
        }
        if (ids.length < COMPARISON_MIN_ITEMS || ids.length > COMPARISON_MAX_ITEMS) {
          context.addIssue({
            code: "custom",
            message: `${name} must list ${COMPARISON_MIN_ITEMS} to ${COMPARISON_MAX_ITEMS} ${name === "sites" ? "sites" : "campaigns"} to compare; got ${ids.length}.`,
          });
          return z.NEVER;
        }
        return ids;
      })
      .optional(),
  );

const positiveNumber = (name: string, unitWords: string, limits: { max: number }) =>
  z.preprocess(
    emptyToUndefined,
    z.coerce
      .number({ error: `${name} must be a number of ${unitWords}.` })
      .refine((value) => Number.isFinite(value) && value > 0 && value <= limits.max, `${name} must be a positive number of ${unitWords}, at most ${limits.max}.`)
      .optional(),
  );

/**
 * Query string of `GET /api/comparisons`: `sites=1,3,4` or `campaigns=5,7` (2 to 6, exactly one of the two), the
 * summary's date window and filters (`from`, `to`, `maxZenithDeg`, `sunMaxDeg`, `minFlux`, with from ≤ to), the
 * planned telescope (`apertureM`, `bandNm` default 500, `outerScaleM` default 25) and `pairing=nights|bins`
 * (bins: only the 10-minute bins in which both monitors ran).
 */
export const comparisonQuerySchema = z
  .object({
    sites: idListSchema("sites"),
    campaigns: idListSchema("campaigns"),
    ...summaryQueryShape,
    apertureM: positiveNumber("apertureM", "metres", { max: 100 }),
    bandNm: positiveNumber("bandNm", "nanometres", { max: 30_000 }).transform((value) => value ?? DEFAULT_BAND_NM),
    outerScaleM: positiveNumber("outerScaleM", "metres", { max: 10_000 }).transform((value) => value ?? DEFAULT_OUTER_SCALE_M),
    pairing: z.preprocess(emptyToUndefined, z.enum(["nights", "bins"], { error: "pairing must be nights or bins." }).optional()).transform((value) => value ?? "nights"),
  })
  .refine((value) => (value.sites === undefined) !== (value.campaigns === undefined), {
    message: "Give either sites=… or campaigns=… (2 to 6 ids), not both and not neither.",
    path: ["sites"],
  })
  .refine(...summaryQueryRangeCheck);
export type ComparisonQueryInput = z.input<typeof comparisonQuerySchema>;
export type ComparisonQuery = z.output<typeof comparisonQuerySchema>;

/** A campaign in a comparison row: everything needed to say how its numbers were made. */
export interface ComparedCampaign {
  id: number;
  name: string;
  heightAboveGroundM: number | null;
  response: ResponseSetName;
  /** The response set's name with its source, e.g. "Tokovinin 2002, Z-tilt (PASP 114, 1156)". */
  responseName: string;
  apertureMm: number;
  baselineMm: number;
  wavelengthNm: number;
  pixelScaleArcsec: number | null;
  exposureMs: number | null;
  /** The finished uploads whose samples are in the figures, by id and the sha256 of the raw file. */
  uploads: { id: number; fileName: string; sha256: string; samplesAccepted: number }[];
  exclusions: { from: string; to: string; reason: string }[];
}

/** The figures of one row (null in ComparisonRow.statistics when no sample passes). All seeing at zenith and 500 nm. */
export interface ComparisonRowStatistics {
  samples: number;
  nights: number;
  seeing: { mean: number; p10: number; p25: number; median: number; p75: number; p90: number; medianCi95: [number, number] | null };
  interval: NightIntervalStatus;
  r0: { unit: "cm"; p10: number; p25: number; median: number; p75: number; p90: number };
  /** Share of samples strictly below 0.6, 0.8, 1.0″, each with its whole-night bootstrap interval (null below 10 nights). */
  fractionBelow: Record<string, number>;
  fractionBelowCi95: Record<string, [number, number] | null>;
  lognormal: { mu: number; sigma: number; median: number; ks: number };
  seasonBalanced: SeasonBalancedMedian;
  seasons: SeasonStatistics[];
  nightlyMedians: { nights: number; median: number; p25: number; p75: number };
  /** Predicted long-exposure FWHM of the planned telescope at the row's seeing percentiles. */
  telescope: TelescopePrediction;
  /** Chart data: monthly medians and a thinned cumulative distribution (at most 101 points). */
  monthly: { month: string; samples: number; nights: number; median: number }[];
  cdf: { seeingArcsec: number; fraction: number }[];
}

export interface ComparisonRow {
  /** "site:3" or "campaign:5": stable within a comparison. */
  key: string;
  /** What the row is called on screen: the site's name, or for a campaign row "Site — campaign". */
  label: string;
  site: { id: number; name: string; latitude: number; longitude: number; elevationM: number };
  /** For a campaign comparison the row's campaign; for a site comparison null (the row pools the visible campaigns). */
  campaignId: number | null;
  campaigns: ComparedCampaign[];
  /** Stored samples in the window, accepted ones, and why the rest were set aside. */
  samples: { inWindow: number; accepted: number; rejectedByReason: Record<string, number> };
  statistics: ComparisonRowStatistics | null;
  /** Everything that could mislead about this row, in words: the summary's own warnings, then the comparison's. */
  warnings: { code: string; message: string }[];
}

export interface PairedFigures {
  commonNights: number;
  matching: "nights" | "bins";
  binMinutes: number | null;
  samplesA: number;
  samplesB: number;
  medianA: number | null;
  medianB: number | null;
  /** A − B on the common nights (negative: A sharper). */
  medianDifferenceArcsec: number | null;
  ci95: [number, number] | null;
  interval: NightIntervalStatus;
  nightlyDifferences: { p10: number | null; p25: number | null; median: number | null; p75: number | null; p90: number | null };
  wilcoxon: WilcoxonSignedRankResult | null;
  verdict: "a_sharper" | "b_sharper" | "no_clear_difference" | null;
  /** The verdict in one sentence (describePairedVerdict). */
  sentence: string;
  /** Histogram of the night-by-night differences A − B (chart data). */
  histogram: DifferenceBin[];
}

export interface UnpairedFigures {
  /** Pooled median of A minus that of B over the whole window (negative: A sharper). */
  medianDifferenceArcsec: number;
  ci95: [number, number];
  mannWhitney: { u: number; z: number; pValue: number; nightsA: number; nightsB: number };
  /** The plain caveat shown beside these figures. */
  note: string;
}

export interface ComparisonPair {
  /** Indexes into rows (a < b), and their keys. */
  a: number;
  b: number;
  aKey: string;
  bKey: string;
  paired: PairedFigures | null;
  unpaired: UnpairedFigures | null;
  warnings: ComparisonWarning[];
}

/**
 * `GET /api/comparisons`: self-contained, so it can be stored as it is (a report freezes it): the window and
 * filters, the telescope settings, each campaign's monitor settings and response set, the uploads used by id and
 * sha256, the methods, and thinned chart data.
 */
export interface ComparisonResponse {
  generatedAt: string;
  kind: "sites" | "campaigns";
  window: { from: string | null; to: string | null };
  filters: { maxZenithDeg: number; sunMaxDeg: number; minFlux: number | null; standard: boolean };
  telescope: { apertureM: number | null; bandNm: number; outerScaleM: number; method: string };
  pairing: { matching: "nights" | "bins"; binMinutes: number | null };
  method: {
    seeing: string;
    interval: string;
    seasonBalanced: string;
    paired: string;
    signedRank: string;
    unpaired: string;
    bootstrap: { replicates: number; seed: number };
  };
  /** The response-coefficient sets used, by name, once each. */
  coefficientSets: string[];
  rows: ComparisonRow[];
  pairs: ComparisonPair[];
  /** Warnings about the whole comparison (e.g. filters other than the standard ones). */
  warnings: ComparisonWarning[];
}
