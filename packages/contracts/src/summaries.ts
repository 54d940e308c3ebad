import { z } from "zod";
import { isoInstantSchema } from "./campaigns";
import type { ResponseSetName } from "./campaigns";
import type { SampleCounts } from "./uploads";
import type { SeeingSummary } from "@calmcrest/seeing-stats";

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
export const summaryQuerySchema = z.object({
  from: isoInstantSchema.optional(),
  to: isoInstantSchema.optional(),
  maxZenithDeg: optionalNumber("maxZenithDeg", "degrees").refine((v) => v === undefined || (v > 0 && v <= 90), "maxZenithDeg must be between 0 and 90 degrees."),
  sunMaxDeg: optionalNumber("sunMaxDeg", "degrees").refine((v) => v === undefined || (v >= -90 && v <= 90), "sunMaxDeg must be between -90 and 90 degrees."),
  minFlux: optionalNumber("minFlux", "flux units"),
});
export type SummaryQuery = z.infer<typeof summaryQuerySchema>;

/** Statistics of accepted samples, at zenith and 500 nm: exactly the seeing engine's SeeingSummary (one definition). */
export type SeeingStatistics = SeeingSummary;

/** Header of every summary answer: what was summarised and with which settings. */
export interface SummaryScope {
  kind: "campaign" | "site";
  siteId: number;
  siteName: string;
  /** The campaigns included (for a site: the caller's visible campaigns), with what makes them comparable. */
  campaigns: { id: number; name: string; heightAboveGroundM: number | null; response: ResponseSetName; wavelengthNm: number }[];
  filters: { from: string | null; to: string | null; maxZenithDeg: number; sunMaxDeg: number; minFlux: number | null };
  exclusions: { from: string; to: string; reason: string }[];
  /**
   * read = stored samples in the time range (plus, with no time range, the rows rejected at ingest);
   * rejectedByReason names filter, exclusion and (without a time range) ingest reasons.
   */
  samples: SampleCounts;
  /** True when `samples` includes the rows rejected at ingest (only without from/to: those rows have no usable time). */
  includesIngestRejections: boolean;
}

/**
 * `GET /api/campaigns/:id/summary`, `GET /api/sites/:id/summary`: the analyzer's JSON fields plus chart data.
 * `empty: true` when no sample passes the filters (then there are no statistics).
 */
export type SummaryResponse = (SummaryScope & { empty: false } & SeeingStatistics) | (SummaryScope & { empty: true });
