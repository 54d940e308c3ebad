import { useMutation, useQueryClient, type QueryClient } from "@tanstack/react-query";
import type { ColumnMappingInput, CreateCampaignInput, CreateExclusionInput, CreateSiteInput, PatchCampaignInput, PatchSiteInput, ReadOptionsInput, SavedMapping } from "@calmcrest/contracts";
import { addExclusion, removeExclusion, saveMapping, updateCampaign } from "./campaigns";
import { campaignKeys, siteKeys } from "./query-keys";
import { createCampaign, createSite, updateSite } from "./sites";
import { sendUpload } from "./uploads";

// The field screens' changes as mutations. Each one's onSuccess returns the invalidation's promise, so
// `mutateAsync` resolves only once the queries showing the change have been refetched: a form that says "Saved"
// after it already shows the new figures.

/** A campaign's samples or settings changed: its page, its site's page and summary, the site list and the campaign list. */
function campaignChanged(queryClient: QueryClient, campaignId: number) {
  return Promise.all([
    queryClient.invalidateQueries({ queryKey: campaignKeys.detail(campaignId) }),
    queryClient.invalidateQueries({ queryKey: campaignKeys.list() }),
    queryClient.invalidateQueries({ queryKey: siteKeys.all }),
  ]);
}

export function useCreateSite() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateSiteInput) => createSite(input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: siteKeys.all }),
  });
}

export function useUpdateSite(siteId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (patch: PatchSiteInput) => updateSite(siteId, patch),
    // The site's name and figures appear in the site list, its own page and the pages and lists of its campaigns.
    onSuccess: () => Promise.all([queryClient.invalidateQueries({ queryKey: siteKeys.all }), queryClient.invalidateQueries({ queryKey: campaignKeys.all })]),
  });
}

export function useCreateCampaign(siteId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateCampaignInput) => createCampaign(siteId, input),
    onSuccess: () => Promise.all([queryClient.invalidateQueries({ queryKey: siteKeys.all }), queryClient.invalidateQueries({ queryKey: campaignKeys.list() })]),
  });
}

export function useUpdateCampaign(campaignId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (patch: PatchCampaignInput) => updateCampaign(campaignId, patch),
    onSuccess: () => campaignChanged(queryClient, campaignId),
  });
}

/** Exclusions change every summary of the campaign and of its site. */
export function useAddExclusion(campaignId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateExclusionInput) => addExclusion(campaignId, input),
    onSuccess: () => campaignChanged(queryClient, campaignId),
  });
}

export function useRemoveExclusion(campaignId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (exclusionId: number) => removeExclusion(campaignId, exclusionId),
    onSuccess: () => campaignChanged(queryClient, campaignId),
  });
}

/** The mapping kept for a campaign's next upload: only the campaign's page shows it. */
export function useSaveMapping() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ campaignId, input }: { campaignId: number; input: SavedMapping }) => saveMapping(campaignId, input),
    onSuccess: (_saved, { campaignId }) => queryClient.invalidateQueries({ queryKey: campaignKeys.detail(campaignId) }),
  });
}

export interface SendUploadInput {
  campaignId: number;
  file: File;
  mapping: ColumnMappingInput;
  onProgress: (fraction: number) => void;
  signal?: AbortSignal;
  readOptions?: ReadOptionsInput;
}

/**
 * Sends one log file for storing. The server answers once the file is stored and queued, before its samples are
 * read, so the figures change later (the upload's progress view invalidates them when the reading ends); only the
 * campaign's upload list changes now.
 */
export function useSendUpload() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ campaignId, file, mapping, onProgress, signal, readOptions }: SendUploadInput) => sendUpload(campaignId, file, mapping, onProgress, signal, readOptions),
    onSuccess: (_outcome, { campaignId }) => queryClient.invalidateQueries({ queryKey: campaignKeys.detail(campaignId) }),
  });
}
