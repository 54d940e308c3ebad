import type { SamplesQuery, SummaryQuery } from "@calmcrest/contracts";
import type { CampaignRow, IngestRejections, SiteRow } from "../store/index";
import type { SampleCache } from "./sample-cache.server";
import { sampleSeries } from "./sample-series.server";
import { runComparisonTask, type ComparisonTaskInput } from "./comparison";
import { buildSummary, computeSiteBrief, resolveQuery } from "./summarize.server";

// The computations the summary workers run (summary-worker.ts), by name. Each names the campaigns it reads, so
// the worker can bring exactly those up to their committed data version (SampleCache.sync) before it runs, and
// returns a JSON-serialisable answer. To add one (a comparison, say): add an entry here with its input type, and
// call it from the main thread with `context.summaries.compute(kind, …)` (summary-service.server.ts). The run
// function gets only the worker's sample cache and the input: anything else it needs comes in the input.

export interface SummaryTaskInput {
  kind: "campaign" | "site";
  site: SiteRow;
  campaigns: CampaignRow[];
  query: SummaryQuery;
  ingestRejections: IngestRejections;
}

export interface BriefTaskInput {
  site: SiteRow;
  campaignIds: number[];
}

export interface SeriesTaskInput {
  campaignIds: number[];
  longitudeDeg: number;
  query: SamplesQuery;
}

interface TaskDefinition<Input> {
  /** The campaigns whose samples the task reads. */
  campaignIds(input: Input): readonly number[];
  run(cache: SampleCache, input: Input): unknown;
  /** Whether the task reads the per-axis seeing columns (only the sample series does; they are loaded on demand). */
  axes?: boolean;
}

function task<Input>(definition: TaskDefinition<Input>): TaskDefinition<Input> {
  return definition;
}

export interface StoredTimesTaskInput {
  campaignId: number;
}

export const SUMMARY_TASKS = {
  // The campaign's stored sample times, ascending, as binary (a Float64Array): the upload wizard's whole-file
  // check looks up duplicates in them. Not cached (summary-service.server.ts storedTimes).
  storedTimes: task<StoredTimesTaskInput>({
    campaignIds: (input) => [input.campaignId],
    run: (cache, input) => {
      const { timeMs, count } = cache.columns(input.campaignId);
      return timeMs.slice(0, count);
    },
  }),
  summary: task<SummaryTaskInput>({
    campaignIds: (input) => input.campaigns.map((campaign) => campaign.id),
    run: (cache, input) =>
      buildSummary(cache, { kind: input.kind, site: input.site, campaigns: input.campaigns, resolved: resolveQuery(input.query), ingestRejections: input.ingestRejections }),
  }),
  brief: task<BriefTaskInput>({
    campaignIds: (input) => input.campaignIds,
    run: (cache, input) => computeSiteBrief(cache, input.site, input.campaignIds),
  }),
  series: task<SeriesTaskInput>({
    campaignIds: (input) => input.campaignIds,
    axes: true,
    run: (cache, input) => sampleSeries(cache, input.campaignIds, input.longitudeDeg, input.query),
  }),
  // GET /api/comparisons: 2–6 rows side by side (comparison.ts; the main thread's part is compare.server.ts).
  comparison: task<ComparisonTaskInput>({
    campaignIds: (input) => input.rows.flatMap((row) => row.campaignIds),
    run: (cache, input) => runComparisonTask(cache, input),
  }),
};

export type SummaryTaskKind = keyof typeof SUMMARY_TASKS;
export type SummaryTaskInputs = { [Kind in SummaryTaskKind]: Parameters<(typeof SUMMARY_TASKS)[Kind]["run"]>[1] };
