import { queryOptions } from "@tanstack/react-query";
import type { AppConfig, CreateCampaignInput, CreateSiteInput, PatchSiteInput, SiteDetail, SiteListItem, SummaryQuery, SummaryResponse } from "@calmcrest/contracts";
import { api } from "./client";
import { summaryQueryString } from "../lib/filter-params";
import { configKey, siteKeys } from "./query-keys";

/** Deployment settings (online map tiles or none). */
export const configQuery = queryOptions({
  queryKey: configKey,
  queryFn: () => api<AppConfig>("/config"),
  staleTime: Infinity,
});

export const sitesQuery = queryOptions({
  queryKey: siteKeys.list(),
  queryFn: () => api<SiteListItem[]>("/sites"),
});

export const siteQuery = (siteId: number) =>
  queryOptions({
    queryKey: siteKeys.detail(siteId),
    queryFn: () => api<SiteDetail>(`/sites/${siteId}`),
  });

export const siteSummaryQuery = (siteId: number, filters: SummaryQuery) =>
  queryOptions({
    queryKey: siteKeys.summary(siteId, filters),
    queryFn: () => api<SummaryResponse>(`/sites/${siteId}/summary${summaryQueryString(filters)}`),
  });

export const createSite = (input: CreateSiteInput) => api<SiteDetail>("/sites", { body: input });
export const createCampaign = (siteId: number, input: CreateCampaignInput) => api<unknown>(`/sites/${siteId}/campaigns`, { body: input });
/** Changes some fields of a site; 409 when the change would move a site that already has uploads. */
export const updateSite = (siteId: number, input: PatchSiteInput) => api<SiteDetail>(`/sites/${siteId}`, { method: "PATCH", body: input });
