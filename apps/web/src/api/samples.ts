import { queryOptions, type QueryClient } from "@tanstack/react-query";
import type { SampleSeries, SummaryQuery, SummaryResponse } from "@calmcrest/contracts";
import { api } from "./client";
import { paramsWithFilters } from "../lib/filter-params";
import { campaignKeys, siteKeys } from "./query-keys";

export type Scope = { kind: "site" | "campaign"; id: number };

const base = (scope: Scope) => (scope.kind === "site" ? `/sites/${scope.id}` : `/campaigns/${scope.id}`);

/** Single samples for the per-sample charts; `night` narrows to one night, otherwise the whole window thinned. */
export const samplesQuery = (scope: Scope, filters: SummaryQuery, options: { night?: string; maxPoints?: number } = {}) =>
  queryOptions({
    queryKey: scope.kind === "site" ? siteKeys.samples(scope.id, filters, options) : campaignKeys.samples(scope.id, filters, options),
    queryFn: () => {
      const params = paramsWithFilters(new URLSearchParams(), filters);
      if (options.night) params.set("night", options.night);
      if (options.maxPoints) params.set("maxPoints", String(options.maxPoints));
      const query = params.toString();
      return api<SampleSeries>(`${base(scope)}/samples${query ? `?${query}` : ""}`);
    },
  });

/** The night chart asks for every sample of one night up to this many; the axis chart for this many spread over the window. */
export const NIGHT_MAX_POINTS = 5000;
export const AXIS_MAX_POINTS = 1500;

/** The night the night chart shows: the one in the address (`?night=`) when the figures have it, else the latest. */
export function nightShown(nights: readonly { night: string }[], requested: string | null): string | undefined {
  return requested && nights.some((entry) => entry.night === requested) ? requested : nights[nights.length - 1]?.night;
}

export const nightSamplesQuery = (scope: Scope, filters: SummaryQuery, night: string | undefined) => samplesQuery(scope, filters, { night, maxPoints: NIGHT_MAX_POINTS });
export const axisSamplesQuery = (scope: Scope, filters: SummaryQuery) => samplesQuery(scope, filters, { maxPoints: AXIS_MAX_POINTS });

/**
 * Starts the per-sample charts' requests from the page's loader: the axis chart's at once, the night chart's as soon
 * as the summary names the nights, instead of after the charts' code has arrived and drawn. Nothing waits for them.
 */
export function prefetchChartSamples(queryClient: QueryClient, scope: Scope, filters: SummaryQuery, summary: Promise<SummaryResponse>, requestedNight: string | null): void {
  void queryClient.prefetchQuery(axisSamplesQuery(scope, filters));
  summary
    .then((figures) => {
      const night = figures.empty ? undefined : nightShown(figures.nightly, requestedNight);
      if (night) void queryClient.prefetchQuery(nightSamplesQuery(scope, filters, night));
    })
    // The page shows the summary's own error; a prefetch has nothing to add.
    .catch(() => undefined);
}
