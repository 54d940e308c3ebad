import { z } from "zod";
import { filterSettingAllowed } from "@calmcrest/seeing-stats";
import { instantMs, isoInstantSchema } from "./campaigns";
import type { ResponseSetName } from "./campaigns";
import type { SampleCounts } from "./uploads";
import type { NightIntervalStatus, SeeingSummary, SummaryWarning } from "@calmcrest/seeing-stats";

/**
 * What the filter settings are called on screen: a person reads "the zenith limit", not the query parameter. The
 * parameter follows in parentheses for those calling the API. The allowed ranges are the engine's (filterSettingAllowed).
 */
export const FILTER_SETTING_MESSAGES = {
  maxZenithDeg: "The zenith limit (maxZenithDeg) must be more than 0° and at most 90°.",
  sunMaxDeg: "The sun limit (sunMaxDeg) must be between −90° and 90°.",
  minFlux: "The flux minimum (minFlux) must be a number of flux units.",
} as const;

const optionalNumber = (name: string, unit: string) =>
  z.preprocess(
    (value) => (value === "" || value === undefined ? undefined : value),
    z.coerce.number({ error: `${name} must be a number of ${unit}.` }).refine(Number.isFinite, `${name} must be a number of ${unit}.`).optional(),
  );

/**
 * Query string of `GET /api/campaigns/:id/summary` and `GET /api/sites/:id/summary`.
 * `from`/`to`: ISO dates or date-times (UTC); samples with from <= time < to. A bare `to` date includes that whole day.
 * Filter settings default to the seeing engine's DEFAULT_FILTERS (60 deg, -18 deg, no flux limit).
 */
const DAY_MS = 86_400_000;

/** The end of a `to` bound: a bare date includes that whole day. */
export function rangeEndMs(to: string): number {
  return instantMs(to) + (to.length === 10 ? DAY_MS : 0);
}

/** The summary query's fields, for schemas that extend it (the samples query). */
export const summaryQueryShape = {
  from: isoInstantSchema.optional(),
  to: isoInstantSchema.optional(),
  // The engine's filter limits (filterLimits.ts), so the API refuses what the analyzer refuses.
  maxZenithDeg: optionalNumber("The zenith limit (maxZenithDeg)", "degrees").refine((v) => v === undefined || filterSettingAllowed("maxZenithDeg", v), FILTER_SETTING_MESSAGES.maxZenithDeg),
  sunMaxDeg: optionalNumber("The sun limit (sunMaxDeg)", "degrees").refine((v) => v === undefined || filterSettingAllowed("sunMaxDeg", v), FILTER_SETTING_MESSAGES.sunMaxDeg),
  minFlux: optionalNumber("The flux minimum (minFlux)", "flux units"),
  /** `true` keeps samples flagged anisotropic (their two axes disagree); left out by default, as in the analyzer. */
  keepAnisotropic: z.preprocess(
    (value) => (value === "true" ? true : value === "false" ? false : value === "" ? undefined : value),
    z.boolean({ error: "keepAnisotropic must be true or false." }).optional(),
  ),
};

/**
 * from <= to: an inverted range is refused, naming `to`. A bare `to` date is the whole of that day, so it must
 * end after `from` (from 2025-03-02 to 2025-03-01 is refused; from and to the same day is that day).
 */
const fromNotAfterTo = (value: { from?: string | undefined; to?: string | undefined }) => {
  if (value.from === undefined || value.to === undefined) return true;
  const fromMs = instantMs(value.from);
  return value.to.length === 10 ? fromMs < rangeEndMs(value.to) : fromMs <= instantMs(value.to);
};
const FROM_AFTER_TO = { message: "to must not be before from: the window must end on or after its first day.", path: ["to"] };

/** The from <= to check, for schemas built on summaryQueryShape. */
export const summaryQueryRangeCheck = [fromNotAfterTo, FROM_AFTER_TO] as const;

export const summaryQuerySchema = z.object(summaryQueryShape).refine(...summaryQueryRangeCheck);
export type SummaryQuery = z.infer<typeof summaryQuerySchema>;

/** Statistics of accepted samples, at zenith and 500 nm: exactly the seeing engine's SeeingSummary (one definition). */
export type SeeingStatistics = SeeingSummary;

/**
 * The figures of one group of a site's campaigns (campaigns with one response set, or monitors at one height),
 * given beside the pooled figures when the campaigns differ, so that nothing is pooled without a word.
 */
export interface SummaryGroup {
  /** What the group has in common, in words (e.g. "Tokovinin 2002, Z-tilt" or "monitor 5 m above ground"). */
  label: string;
  campaignIds: number[];
  samples: number;
  nights: number;
  /** Seeing at zenith and 500 nm; null when no sample of the group passes. */
  median: number | null;
  p25: number | null;
  p75: number | null;
  medianCi95: [number, number] | null;
  interval: NightIntervalStatus | null;
  seasonBalancedMedian: number | null;
}

/** Header of every summary answer: what was summarised and with which settings. */
export interface SummaryScope {
  kind: "campaign" | "site";
  siteId: number;
  siteName: string;
  /** The campaigns included (for a site: the caller's visible campaigns), with what makes them comparable. */
  campaigns: { id: number; name: string; heightAboveGroundM: number | null; response: ResponseSetName; wavelengthNm: number }[];
  filters: { from: string | null; to: string | null; maxZenithDeg: number; sunMaxDeg: number; minFlux: number | null; leaveOutAnisotropic: boolean };
  exclusions: { from: string; to: string; reason: string }[];
  /**
   * read = stored samples in the time range (plus, with no time range, the rows rejected at ingest);
   * rejectedByReason names filter, exclusion and (without a time range) ingest reasons.
   */
  samples: SampleCounts;
  /** True when `samples` includes the rows rejected at ingest (only without from/to: those rows have no usable time). */
  includesIngestRejections: boolean;
  /**
   * What could mislead, each a code and a sentence (the engine's summary warnings). Also on an empty answer: a
   * wrong-sign longitude can be why nothing passes the sun filter.
   */
  warnings: SummaryWarning[];
  /** Per campaign when the campaigns use different response coefficient sets (warning mixed_response_sets); else null. */
  byCampaign: SummaryGroup[] | null;
  /** Per monitor height when the campaigns' monitors stand at different heights (warning mixed_monitor_heights); else null. */
  byHeight: SummaryGroup[] | null;
}

/**
 * `GET /api/campaigns/:id/summary`, `GET /api/sites/:id/summary`: the analyzer's JSON fields plus chart data.
 * `empty: true` when no sample passes the filters (then there are no statistics).
 */
export type SummaryResponse = (SummaryScope & { empty: false } & SeeingStatistics) | (SummaryScope & { empty: true });
