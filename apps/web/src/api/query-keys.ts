import type { SummaryQuery } from "@calmcrest/contracts";

/**
 * The query keys of the field screens, built in one place so a query and the invalidation after a change always
 * agree: every key of an area starts with the area's `all`, a site's or campaign's keys with its `detail(id)`, so
 * invalidating `detail(id)` refreshes its summary and samples too.
 */
export const siteKeys = {
  all: ["sites"] as const,
  list: () => [...siteKeys.all, "list"] as const,
  detail: (siteId: number) => [...siteKeys.all, "detail", siteId] as const,
  summary: (siteId: number, filters: SummaryQuery) => [...siteKeys.detail(siteId), "summary", filters] as const,
  samples: (siteId: number, filters: SummaryQuery, options: object) => [...siteKeys.detail(siteId), "samples", filters, options] as const,
};

export const campaignKeys = {
  all: ["campaigns"] as const,
  /** GET /api/campaigns: every campaign the user can see. */
  list: () => [...campaignKeys.all, "list"] as const,
  detail: (campaignId: number) => [...campaignKeys.all, "detail", campaignId] as const,
  summaries: (campaignId: number) => [...campaignKeys.detail(campaignId), "summary"] as const,
  summary: (campaignId: number, filters: SummaryQuery) => [...campaignKeys.summaries(campaignId), filters] as const,
  allSamples: (campaignId: number) => [...campaignKeys.detail(campaignId), "samples"] as const,
  samples: (campaignId: number, filters: SummaryQuery, options: object) => [...campaignKeys.allSamples(campaignId), filters, options] as const,
};

export const uploadKeys = {
  all: ["uploads"] as const,
  detail: (uploadId: number) => [...uploadKeys.all, "detail", uploadId] as const,
  /** The first lines of an upload's stored file, as they are (the re-read form shows them). */
  rawHead: (uploadId: number) => [...uploadKeys.detail(uploadId), "raw-head"] as const,
  /** The server's reading of a file's first rows with a mapping and read options (time format, delimiter, header line…). */
  preview: (campaignId: number, file: { name: string; size: number; lastModified: number }, mapping: object, readOptions: object) =>
    [...uploadKeys.all, "preview", campaignId, file.name, file.size, file.lastModified, mapping, readOptions] as const,
};

export const userKeys = {
  all: ["users"] as const,
  list: () => [...userKeys.all, "list"] as const,
  detail: (userId: string) => [...userKeys.all, "detail", userId] as const,
};

/** The signed-in person (`me`) and their own settings: invalidating `meKeys.all` refreshes both. */
export const meKeys = {
  all: ["me"] as const,
  preferences: () => [...meKeys.all, "preferences"] as const,
};

/** A one-time password link, read before the set-password form is shown. */
export const passwordLinkKey = (token: string) => ["password-link", token] as const;

/** Deployment settings (map tiles or none). */
export const configKey = ["config"] as const;

export const auditKeys = {
  all: ["audit"] as const,
  page: (filters: object) => [...auditKeys.all, "page", filters] as const,
};

export const outboxKeys = {
  all: ["outbox"] as const,
  list: () => [...outboxKeys.all, "list"] as const,
};

/** `GET /api/comparisons?…`: the key holds the whole query string, so each bookmarked comparison caches on its own. */
export const comparisonKey = (queryString: string) => ["comparisons", queryString] as const;

/**
 * Reports: a report's versions, comments and preview sit under `detail(id)`, so invalidating the detail refreshes
 * all of them; the list and the recipients are separate.
 */
export const reportKeys = {
  all: ["reports"] as const,
  list: () => [...reportKeys.all, "list"] as const,
  recipients: () => [...reportKeys.all, "recipients"] as const,
  detail: (reportId: number) => [...reportKeys.all, "detail", reportId] as const,
  version: (reportId: number, version: number, since: number | null) => [...reportKeys.detail(reportId), "version", version, since] as const,
  comments: (reportId: number) => [...reportKeys.detail(reportId), "comments"] as const,
  preview: (reportId: number) => [...reportKeys.detail(reportId), "preview"] as const,
};
