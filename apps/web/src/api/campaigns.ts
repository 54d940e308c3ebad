import { queryOptions } from "@tanstack/react-query";
import type { AddMemberInput, CampaignDetail, CreateExclusionInput, Exclusion, PatchCampaignInput, SavedMapping, SummaryQuery, SummaryResponse, VisibleCampaign } from "@calmcrest/contracts";
import { api } from "./client";
import { summaryQueryString } from "../lib/filter-params";
import { campaignKeys } from "./query-keys";

/** Every campaign the user can see, with its site's name: one request (GET /api/campaigns). */
export const visibleCampaignsQuery = queryOptions({
  queryKey: campaignKeys.list(),
  queryFn: () => api<VisibleCampaign[]>("/campaigns"),
});

export const campaignQuery = (campaignId: number) =>
  queryOptions({
    queryKey: campaignKeys.detail(campaignId),
    queryFn: () => api<CampaignDetail>(`/campaigns/${campaignId}`),
    // While an upload is waiting or being read, keep the page current without a reload.
    refetchInterval: (query) => (query.state.data?.uploads.some((upload) => upload.status === "queued" || upload.status === "ingesting") ? 1500 : false),
  });

export const campaignSummaryQuery = (campaignId: number, filters: SummaryQuery) =>
  queryOptions({
    queryKey: campaignKeys.summary(campaignId, filters),
    queryFn: () => api<SummaryResponse>(`/campaigns/${campaignId}/summary${summaryQueryString(filters)}`),
  });

/** Re-reads a failed or interrupted upload from its stored raw file (202 once queued). */
export const retryUpload = (uploadId: number) => api<unknown>(`/uploads/${uploadId}/retry`, { method: "POST" });

export const addExclusion = (campaignId: number, input: CreateExclusionInput) =>
  api<Exclusion>(`/campaigns/${campaignId}/exclusions`, { body: input });
export const removeExclusion = (campaignId: number, exclusionId: number) =>
  api<unknown>(`/campaigns/${campaignId}/exclusions/${exclusionId}`, { method: "DELETE" });

export const saveMapping = (campaignId: number, input: SavedMapping) =>
  api<unknown>(`/campaigns/${campaignId}/saved-mapping`, { method: "PUT", body: input });

export const addMember = (campaignId: number, input: AddMemberInput) => api<unknown>(`/campaigns/${campaignId}/members`, { body: input });
export const removeMember = (campaignId: number, userId: string) =>
  api<unknown>(`/campaigns/${campaignId}/members/${encodeURIComponent(userId)}`, { method: "DELETE" });

/** Changes some fields of a campaign; 409 when it would change the monitor of a campaign that has uploads. */
export const updateCampaign = (campaignId: number, input: PatchCampaignInput) =>
  api<CampaignDetail>(`/campaigns/${campaignId}`, { method: "PATCH", body: input });
