import { queryOptions } from "@tanstack/react-query";
import type { SampleSeries, SummaryQuery } from "@calmcrest/contracts";
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
