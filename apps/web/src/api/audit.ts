import { queryOptions } from "@tanstack/react-query";
import type { AuditPage } from "@calmcrest/contracts";
import { api } from "./client";
import { auditKeys } from "./query-keys";

/** The audit page's filters as they stand in the address (all optional; page from 1). */
export interface AuditFilters {
  userId?: string;
  action?: string;
  from?: string;
  to?: string;
  page?: number;
}

export function auditSearch(filters: AuditFilters, withPage = true): string {
  const params = new URLSearchParams();
  for (const key of ["userId", "action", "from", "to"] as const) {
    const value = filters[key];
    if (value) params.set(key, value);
  }
  if (withPage && filters.page && filters.page > 1) params.set("page", String(filters.page));
  return params.toString();
}

export const auditQuery = (filters: AuditFilters) =>
  queryOptions({
    queryKey: auditKeys.page(filters),
    queryFn: () => api<AuditPage>(`/audit?${auditSearch(filters)}`),
  });

/** The CSV download of every row matching the filters (not only this page). */
export const auditCsvUrl = (filters: AuditFilters) => `/api/audit/export.csv?${auditSearch(filters, false)}`;

/** The audit page's filters from the address (so a filtered view can be bookmarked and shared). */
export function auditFiltersFrom(params: URLSearchParams): AuditFilters {
  const page = Number(params.get("page") ?? "1");
  const pick = (key: string) => params.get(key) || undefined;
  return { userId: pick("userId"), action: pick("action"), from: pick("from"), to: pick("to"), page: Number.isInteger(page) && page > 1 ? page : 1 };
}
