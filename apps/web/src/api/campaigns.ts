import { queryOptions } from "@tanstack/react-query";
import type { AddMemberInput, CampaignDetail, CreateExclusionInput, Exclusion, SavedMapping, SummaryQuery, SummaryResponse } from "@calmcrest/contracts";
import { api } from "./client";
import { summaryQueryString } from "../lib/filter-params";

export const campaignQuery = (campaignId: number) =>
  queryOptions({
    queryKey: ["campaigns", "detail", campaignId],
    queryFn: () => api<CampaignDetail>(`/campaigns/${campaignId}`),
  });

export const campaignSummaryQuery = (campaignId: number, filters: SummaryQuery) =>
  queryOptions({
    queryKey: ["campaigns", "detail", campaignId, "summary", filters],
    queryFn: () => api<SummaryResponse>(`/campaigns/${campaignId}/summary${summaryQueryString(filters)}`),
  });

export const addExclusion = (campaignId: number, input: CreateExclusionInput) =>
  api<Exclusion>(`/campaigns/${campaignId}/exclusions`, { body: input });
export const removeExclusion = (campaignId: number, exclusionId: number) =>
  api<unknown>(`/campaigns/${campaignId}/exclusions/${exclusionId}`, { method: "DELETE" });

export const saveMapping = (campaignId: number, input: SavedMapping) =>
  api<unknown>(`/campaigns/${campaignId}/saved-mapping`, { method: "PUT", body: input });

export const addMember = (campaignId: number, input: AddMemberInput) => api<unknown>(`/campaigns/${campaignId}/members`, { body: input });
export const removeMember = (campaignId: number, userId: string) =>
  api<unknown>(`/campaigns/${campaignId}/members/${encodeURIComponent(userId)}`, { method: "DELETE" });
