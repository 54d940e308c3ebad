import { z } from "zod";
import { summaryQueryShape, summaryQueryRangeCheck } from "./summaries";

/**
 * Query of `GET /api/campaigns/:id/samples` and `GET /api/sites/:id/samples`: the summary filters, plus an optional
 * night ('YYYY-MM-DD', the engine's nightLabel at the site) and a cap on the points returned.
 * Used by the charts that need single samples: seeing through one night, longitudinal against transverse seeing.
 */
export const samplesQuerySchema = z
  .object({
    ...summaryQueryShape,
  night: z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, "night must be a date like 2026-03-01 (the evening the night starts).")
    .optional(),
  maxPoints: z.coerce
    .number({ error: "maxPoints must be a whole number between 10 and 5000." })
    .int("maxPoints must be a whole number between 10 and 5000.")
    .min(10, "maxPoints must be a whole number between 10 and 5000.")
    .max(5000, "maxPoints must be a whole number between 10 and 5000.")
    .optional(),
  })
  .refine(...summaryQueryRangeCheck);
export type SamplesQuery = z.infer<typeof samplesQuerySchema>;

/** One accepted sample (zenith, 500 nm). Per-axis values are null for logs that give seeing or r0 directly. */
export interface SamplePoint {
  timeMs: number;
  seeingArcsec: number;
  seeingLongArcsec: number | null;
  seeingTransArcsec: number | null;
}

/**
 * Answer of the samples routes: accepted samples after the time window, exclusions and filters, in time order.
 * When more than `maxPoints` (default 2000) pass, they are thinned evenly in time and `total` says how many passed.
 */
export interface SampleSeries {
  night: string | null;
  total: number;
  samples: SamplePoint[];
}
