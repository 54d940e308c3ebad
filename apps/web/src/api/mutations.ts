import { useMutation, useQueryClient, type QueryClient } from "@tanstack/react-query";
import type {
  ChangeEmailInput,
  ColumnMappingInput,
  CreateCampaignInput,
  CreateExclusionInput,
  CreateReportInput,
  CreateSiteInput,
  InviteFormInput,
  MailPreferences,
  PatchCampaignInput,
  PatchSiteInput,
  PatchUserInput,
  PublishReportInput,
  ReadOptionsInput,
  ReportComments,
  ReportDetail,
  SavedMapping,
} from "@calmcrest/contracts";
import { signOutEverywhere } from "./auth";
import { addExclusion, addMember, removeExclusion, removeMember, retryUpload, saveMapping, updateCampaign } from "./campaigns";
import { auditKeys, campaignKeys, meKeys, reportKeys, siteKeys, uploadKeys, userKeys } from "./query-keys";
import { createReport, publishReport, setPreferences } from "./reports";
import { createCampaign, createSite, updateSite } from "./sites";
import { restoreUpload, sendUpload, withdrawUpload } from "./uploads";
import { changeEmail, deactivateUser, inviteUser, patchUser, reactivateUser, sendPasswordLink, signOutUserEverywhere } from "./users";

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

/** An upload's samples changed (withdrawn, restored, re-read, read again): its campaign's figures and every upload list. */
export function uploadChanged(queryClient: QueryClient, campaignId: number) {
  return Promise.all([campaignChanged(queryClient, campaignId), queryClient.invalidateQueries({ queryKey: uploadKeys.all })]);
}

/** Withdraw an upload (with the reason for the audit log), restore it, or have a failed one read again. */
export type UploadChange = { kind: "withdraw"; uploadId: number; reason: string } | { kind: "restore"; uploadId: number } | { kind: "retry"; uploadId: number };

export function useChangeUpload(campaignId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (change: UploadChange): Promise<unknown> => {
      if (change.kind === "withdraw") return withdrawUpload(change.uploadId, { reason: change.reason });
      if (change.kind === "restore") return restoreUpload(change.uploadId, {});
      return retryUpload(change.uploadId);
    },
    onSuccess: () => uploadChanged(queryClient, campaignId),
  });
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
  /** The person confirmed keeping a file whose check found no usable row. */
  storeAnyway?: boolean;
}

/**
 * Sends one log file for storing. The server answers once the file is stored and queued, before its samples are
 * read, so the figures change later (the upload's progress view invalidates them when the reading ends); only the
 * campaign's upload list changes now.
 */
export function useSendUpload() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ campaignId, file, mapping, onProgress, signal, readOptions, storeAnyway }: SendUploadInput) =>
      sendUpload(campaignId, file, mapping, onProgress, signal, readOptions, storeAnyway),
    onSuccess: (_outcome, { campaignId }) => queryClient.invalidateQueries({ queryKey: campaignKeys.detail(campaignId) }),
  });
}

// Administration. An account change (role, status, e-mail, campaign membership, invitation) can change the lists
// and pages of people, the audit log, what a field engineer sees (sites and campaigns) and, for one's own account,
// `me`: all of them are refreshed before the change's promise resolves.

function peopleChanged(queryClient: QueryClient) {
  return Promise.all(
    [userKeys.all, auditKeys.all, campaignKeys.all, siteKeys.all, meKeys.all].map((queryKey) => queryClient.invalidateQueries({ queryKey })),
  );
}

function useAccountChange<TInput, TResult>(change: (input: TInput) => Promise<TResult>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: change, onSuccess: () => peopleChanged(queryClient) });
}

export const useInviteUser = () => useAccountChange((input: InviteFormInput) => inviteUser(input));
export const usePatchUser = () => useAccountChange(({ userId, patch }: { userId: string; patch: PatchUserInput }) => patchUser(userId, patch));
export const useChangeEmail = (userId: string) => useAccountChange((input: ChangeEmailInput) => changeEmail(userId, input));
export const useSendPasswordLink = () => useAccountChange((userId: string) => sendPasswordLink(userId));
export const useDeactivateUser = () => useAccountChange((userId: string) => deactivateUser(userId));
export const useReactivateUser = () => useAccountChange((userId: string) => reactivateUser(userId));
export const useSignOutUserEverywhere = () => useAccountChange((userId: string) => signOutUserEverywhere(userId));
export const useAddMember = () => useAccountChange(({ campaignId, userId }: { campaignId: number; userId: string }) => addMember(campaignId, { userId }));
export const useRemoveMember = () => useAccountChange(({ campaignId, userId }: { campaignId: number; userId: string }) => removeMember(campaignId, userId));

/** Ends every session of the signed-in person, this one too: nothing cached stays for the next person. */
export function useSignOutEverywhere() {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: () => signOutEverywhere(), onSuccess: () => queryClient.clear() });
}

export function useSetPreferences() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: MailPreferences) => setPreferences(input),
    onSuccess: (saved) => queryClient.setQueryData(meKeys.preferences(), saved),
  });
}

// Reports.

export function useCreateReport() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateReportInput) => createReport(input),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: reportKeys.list() }),
  });
}

/**
 * A change to a report's working copy (title, sharing, sections): every such call answers with the whole draft,
 * which replaces the cached one; the list (titles, dates) and the draft's comparison preview are fetched again.
 */
export function useReportDraftChange(reportId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (change: () => Promise<ReportDetail>) => change(),
    onSuccess: (detail) => {
      queryClient.setQueryData(reportKeys.detail(reportId), detail);
      return Promise.all([queryClient.invalidateQueries({ queryKey: reportKeys.list() }), queryClient.invalidateQueries({ queryKey: reportKeys.preview(reportId) })]);
    },
  });
}

/** A new version: the report (its version list and draft state) and the list of reports are fetched again. */
export function usePublishReport(reportId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: PublishReportInput) => publishReport(reportId, input),
    onSuccess: () => Promise.all([queryClient.invalidateQueries({ queryKey: reportKeys.detail(reportId) }), queryClient.invalidateQueries({ queryKey: reportKeys.list() })]),
  });
}

/** A comment written, edited, withdrawn, resolved or reopened: the answer is the report's threads; the list shows open counts. */
export function useCommentChange(reportId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (change: () => Promise<ReportComments>) => change(),
    onSuccess: (comments) => {
      queryClient.setQueryData(reportKeys.comments(reportId), comments);
      return queryClient.invalidateQueries({ queryKey: reportKeys.list() });
    },
  });
}
