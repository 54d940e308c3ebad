import { queryOptions } from "@tanstack/react-query";
import type {
  ComparisonResponse,
  CreateCommentInput,
  CreateReportInput,
  CreateSectionInput,
  MailPreferences,
  PatchCommentInput,
  PatchReportInput,
  PatchSectionInput,
  PublishReportInput,
  ReportComments,
  ReportDetail,
  ReportListItem,
  ReportRecipient,
  ReportVersionView,
} from "@calmcrest/contracts";
import { api } from "./client";
import { meKeys, reportKeys } from "./query-keys";

export const reportsQuery = queryOptions({
  queryKey: reportKeys.list(),
  queryFn: () => api<ReportListItem[]>("/reports"),
});

export const reportQuery = (reportId: number) =>
  queryOptions({
    queryKey: reportKeys.detail(reportId),
    queryFn: () => api<ReportDetail>(`/reports/${reportId}`),
  });

/** A frozen version; `since` compares it with that earlier version instead of the previous one. */
export const reportVersionQuery = (reportId: number, version: number, since?: number) =>
  queryOptions({
    queryKey: reportKeys.version(reportId, version, since ?? null),
    queryFn: () => api<ReportVersionView>(`/reports/${reportId}/versions/${version}${since ? `?since=${since}` : ""}`),
    // A published version never changes; only its "newer data" count does.
    staleTime: 60_000,
  });

export const reportCommentsQuery = (reportId: number) =>
  queryOptions({
    queryKey: reportKeys.comments(reportId),
    queryFn: () => api<ReportComments>(`/reports/${reportId}/comments`),
  });

export const reportPreviewQuery = (reportId: number) =>
  queryOptions({
    queryKey: reportKeys.preview(reportId),
    queryFn: () => api<ComparisonResponse>(`/reports/${reportId}/preview`),
  });

export const recipientsQuery = queryOptions({
  queryKey: reportKeys.recipients(),
  queryFn: () => api<ReportRecipient[]>("/reports/recipients"),
});

export const preferencesQuery = queryOptions({
  queryKey: meKeys.preferences(),
  queryFn: () => api<MailPreferences>("/me/preferences"),
});

export const createReport = (input: CreateReportInput) => api<ReportDetail>("/reports", { body: input });
export const patchReport = (reportId: number, input: PatchReportInput) => api<ReportDetail>(`/reports/${reportId}`, { method: "PATCH", body: input });
export const addSection = (reportId: number, input: CreateSectionInput) => api<ReportDetail>(`/reports/${reportId}/sections`, { body: input });
export const patchSection = (reportId: number, sectionId: number, input: PatchSectionInput) =>
  api<ReportDetail>(`/reports/${reportId}/sections/${sectionId}`, { method: "PATCH", body: input });
export const deleteSection = (reportId: number, sectionId: number) => api<ReportDetail>(`/reports/${reportId}/sections/${sectionId}`, { method: "DELETE" });
export const reorderSections = (reportId: number, sectionIds: number[]) => api<ReportDetail>(`/reports/${reportId}/sections/order`, { method: "PUT", body: { sectionIds } });
export const publishReport = (reportId: number, input: PublishReportInput) => api<ReportVersionView>(`/reports/${reportId}/versions`, { body: input });
export const addComment = (reportId: number, input: CreateCommentInput) => api<ReportComments & { id: number }>(`/reports/${reportId}/comments`, { body: input });
export const patchComment = (commentId: number, input: PatchCommentInput) => api<ReportComments>(`/comments/${commentId}`, { method: "PATCH", body: input });
export const setPreferences = (input: MailPreferences) => api<MailPreferences>("/me/preferences", { method: "PATCH", body: input });
