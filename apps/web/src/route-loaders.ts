import type { QueryClient } from "@tanstack/react-query";
import type { LoaderFunctionArgs } from "react-router-dom";
import { campaignQuery, campaignSummaryQuery } from "./api/campaigns";
import { prefetchChartSamples } from "./api/samples";
import { siteQuery, siteSummaryQuery } from "./api/sites";
import { filtersFromParams } from "./lib/filter-params";
import { roleLoader } from "./route-guards";

// Loaders live apart from the page components so the router can start fetching while a page's code
// (charts, map) is still downloading.

/** Route ids are positive integers; anything else is a page that does not exist. */
export function idParam(value: string | undefined): number {
  const id = Number(value);
  if (!Number.isInteger(id) || id <= 0) throw new Response("Not found", { status: 404 });
  return id;
}

/**
 * The loader of a site's or a campaign's page. It starts the summary and the charts' samples beside the site or
 * campaign itself but holds the page only for that: the figures and charts show their own loading states. (One
 * that the user may not see answers 404 to all of them alike.)
 */
function summaryPageLoader(queryClient: QueryClient, kind: "site" | "campaign") {
  const guard = roleLoader(queryClient, ["admin", "lead", "engineer"]);
  return async (args: LoaderFunctionArgs) => {
    await guard(args);
    const id = idParam(kind === "site" ? args.params.siteId : args.params.campaignId);
    const params = new URL(args.request.url).searchParams;
    const { filters } = filtersFromParams(params);
    const summary = kind === "site" ? queryClient.fetchQuery(siteSummaryQuery(id, filters)) : queryClient.fetchQuery(campaignSummaryQuery(id, filters));
    prefetchChartSamples(queryClient, { kind, id }, filters, summary, params.get("night"));
    if (kind === "site") await queryClient.ensureQueryData(siteQuery(id));
    else await queryClient.ensureQueryData(campaignQuery(id));
    return null;
  };
}

export const siteLoader = (queryClient: QueryClient) => summaryPageLoader(queryClient, "site");
export const campaignLoader = (queryClient: QueryClient) => summaryPageLoader(queryClient, "campaign");
