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

export function siteLoader(queryClient: QueryClient) {
  const guard = roleLoader(queryClient, ["admin", "lead", "engineer"]);
  return async (args: LoaderFunctionArgs) => {
    await guard(args);
    const siteId = idParam(args.params.siteId);
    const params = new URL(args.request.url).searchParams;
    const { filters } = filtersFromParams(params);
    // Start the summary and the charts' samples beside the site itself, but hold the page only for the site: the
    // figures and charts show their own loading states. (A site one may not see answers 404 to all of them alike.)
    const summary = queryClient.fetchQuery(siteSummaryQuery(siteId, filters));
    prefetchChartSamples(queryClient, { kind: "site", id: siteId }, filters, summary, params.get("night"));
    await queryClient.ensureQueryData(siteQuery(siteId));
    return null;
  };
}

export function campaignLoader(queryClient: QueryClient) {
  const guard = roleLoader(queryClient, ["admin", "lead", "engineer"]);
  return async (args: LoaderFunctionArgs) => {
    await guard(args);
    const campaignId = idParam(args.params.campaignId);
    const params = new URL(args.request.url).searchParams;
    const { filters } = filtersFromParams(params);
    const summary = queryClient.fetchQuery(campaignSummaryQuery(campaignId, filters));
    prefetchChartSamples(queryClient, { kind: "campaign", id: campaignId }, filters, summary, params.get("night"));
    await queryClient.ensureQueryData(campaignQuery(campaignId));
    return null;
  };
}
