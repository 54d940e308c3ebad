import type { QueryClient } from "@tanstack/react-query";
import type { LoaderFunctionArgs } from "react-router-dom";
import { campaignQuery, campaignSummaryQuery } from "./api/campaigns";
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
    const { filters } = filtersFromParams(new URL(args.request.url).searchParams);
    await queryClient.ensureQueryData(siteQuery(siteId));
    // Start the summary now but do not hold the page for it: the figures show their own loading state.
    void queryClient.prefetchQuery(siteSummaryQuery(siteId, filters));
    return null;
  };
}

export function campaignLoader(queryClient: QueryClient) {
  const guard = roleLoader(queryClient, ["admin", "lead", "engineer"]);
  return async (args: LoaderFunctionArgs) => {
    await guard(args);
    const campaignId = idParam(args.params.campaignId);
    await queryClient.ensureQueryData(campaignQuery(campaignId));
    void queryClient.prefetchQuery(campaignSummaryQuery(campaignId, filtersFromParams(new URL(args.request.url).searchParams).filters));
    return null;
  };
}
