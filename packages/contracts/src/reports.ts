import { z } from "zod";
import { comparisonQuerySchema, type ComparisonResponse } from "./comparisons";

// Committee reports (issue 11): a report is written by a survey lead from a comparison, published as frozen,
// numbered versions, read and discussed by the committee members it is shared with.

/** Starting sections of a new report (the lead can rename, reorder, delete and add). */
export const SUGGESTED_SECTIONS = ["Method", "Results", "Caveats", "Recommendation"] as const;

/** How long after writing a comment its author may still edit it. */
export const COMMENT_EDIT_WINDOW_MS = 15 * 60 * 1000;

export const REPORT_TITLE_MAX_CHARS = 200;
export const SECTION_BODY_MAX_CHARS = 50_000;
export const COMMENT_MAX_CHARS = 10_000;

/**
 * The comparison a report is made from: the query string of the Compare page (`sites=1,3&from=…&maxZenithDeg=…`),
 * as an object of strings. Checked with the comparison's own schema.
 */
export const reportComparisonSchema = z
  .record(z.string(), z.string(), { error: "comparison must be the Compare page's settings, an object of text values such as { sites: \"1,3\" }." })
  .superRefine((value, context) => {
    const parsed = comparisonQuerySchema.safeParse(value);
    if (!parsed.success) for (const issue of parsed.error.issues) context.addIssue({ code: "custom", message: issue.message, path: issue.path });
  });

const titleSchema = z.string().trim().min(1, "Give the report a title.").max(REPORT_TITLE_MAX_CHARS, `A title has at most ${REPORT_TITLE_MAX_CHARS} characters.`);
const sectionTitleSchema = z.string().trim().min(1, "Give the section a title.").max(120, "A section title has at most 120 characters.");
const sectionBodySchema = z.string().max(SECTION_BODY_MAX_CHARS, `A section has at most ${SECTION_BODY_MAX_CHARS} characters.`);

/** Body of `POST /api/reports` (lead, admin). Without `sections`, the suggested four empty ones. */
export const createReportSchema = z.object({
  title: titleSchema,
  summary: z.string().max(5_000, "The summary has at most 5000 characters.").default(""),
  comparison: reportComparisonSchema,
  sections: z.array(z.object({ title: sectionTitleSchema, body: sectionBodySchema.default("") })).max(30).optional(),
});
export type CreateReportInput = z.input<typeof createReportSchema>;
export type CreateReportData = z.output<typeof createReportSchema>;

/** Who a report is shared with: every committee member (the default) or the named ones only. */
export const reportShareSchema = z.discriminatedUnion("mode", [
  z.object({ mode: z.literal("all") }),
  z.object({ mode: z.literal("named"), userIds: z.array(z.string().min(1)).min(1, "Name at least one committee member, or share with all of them.").max(500) }),
]);
export type ReportShare = z.infer<typeof reportShareSchema>;

/** Body of `PATCH /api/reports/:id` (lead, admin): the draft's title, summary, comparison settings, sharing. */
export const patchReportSchema = z
  .object({
    title: titleSchema.optional(),
    summary: z.string().max(5_000, "The summary has at most 5000 characters.").optional(),
    comparison: reportComparisonSchema.optional(),
    share: reportShareSchema.optional(),
  })
  .refine((value) => Object.values(value).some((field) => field !== undefined), { message: "Send at least one of title, summary, comparison or share.", path: ["_"] });
export type PatchReportInput = z.input<typeof patchReportSchema>;
export type PatchReportData = z.output<typeof patchReportSchema>;

/** Body of `POST /api/reports/:id/sections`. Without `position`, the section is added at the end. */
export const createSectionSchema = z.object({ title: sectionTitleSchema, body: sectionBodySchema.default(""), position: z.number().int().min(0).optional() });
export type CreateSectionInput = z.input<typeof createSectionSchema>;

/** Body of `PATCH /api/reports/:id/sections/:sectionId`: rename and/or rewrite. */
export const patchSectionSchema = z
  .object({ title: sectionTitleSchema.optional(), body: sectionBodySchema.optional() })
  .refine((value) => value.title !== undefined || value.body !== undefined, { message: "Send a new title or body.", path: ["_"] });
export type PatchSectionInput = z.input<typeof patchSectionSchema>;
export type PatchSectionData = z.output<typeof patchSectionSchema>;

/** Body of `PUT /api/reports/:id/sections/order`: every section id of the draft, in the new order. */
export const sectionOrderSchema = z.object({ sectionIds: z.array(z.number().int().positive()).min(1, "List the sections in their new order.") });
export type SectionOrderInput = z.infer<typeof sectionOrderSchema>;

/** Body of `POST /api/reports/:id/versions` (publish): an optional note saying what is new. */
export const publishReportSchema = z.object({ note: z.string().trim().max(2_000).default("") });
export type PublishReportInput = z.input<typeof publishReportSchema>;

/** Body of `POST /api/reports/:id/comments`. `sectionId` null: on the whole report. `parentId`: a reply in that thread. */
export const createCommentSchema = z.object({
  body: z.string().trim().min(1, "Write something before sending the comment.").max(COMMENT_MAX_CHARS, `A comment has at most ${COMMENT_MAX_CHARS} characters.`),
  version: z.number({ error: "version must be the number of the report version the comment is about." }).int().positive(),
  sectionId: z.number().int().positive().nullable().default(null),
  parentId: z.number().int().positive().nullable().default(null),
});
export type CreateCommentInput = z.input<typeof createCommentSchema>;
export type CreateCommentData = z.output<typeof createCommentSchema>;

/** Body of `PATCH /api/comments/:id`: edit (author, within 15 minutes), withdraw (author), resolve or reopen a thread (the report's lead, any lead or admin, or the thread's author). */
export const patchCommentSchema = z.discriminatedUnion("action", [
  z.object({ action: z.literal("edit"), body: createCommentSchema.shape.body }),
  z.object({ action: z.literal("withdraw") }),
  z.object({ action: z.literal("resolve") }),
  z.object({ action: z.literal("reopen") }),
], { error: "action must be edit (with body), withdraw, resolve or reopen." });
export type PatchCommentInput = z.infer<typeof patchCommentSchema>;

/** Body of `PATCH /api/me/preferences`. */
export const mailPreferencesSchema = z.object({ commentEmails: z.boolean({ error: "commentEmails must be true or false." }) });
export type MailPreferences = z.infer<typeof mailPreferencesSchema>;

export interface PersonRef {
  id: string;
  name: string;
}

/** One row of `GET /api/reports`. */
export interface ReportListItem {
  id: number;
  title: string;
  summary: string;
  /** draft: never published (leads and admins only); published: has at least one version. */
  status: "draft" | "published";
  lead: PersonRef;
  /** The latest published version, or null for a draft. */
  latestVersion: { number: number; publishedAt: string; publishedBy: PersonRef } | null;
  versionCount: number;
  /** What the comparison compares (site or campaign names). */
  subjects: string[];
  /** Open comment threads (resolved ones not counted). */
  openThreads: number;
  updatedAt: string;
  /** Whether the draft has changes not in the latest version (leads and admins; false for others). */
  unpublishedChanges: boolean;
}

export interface ReportSection {
  /** Stable across versions: comments on a section keep pointing at it. */
  id: number;
  title: string;
  /** Markdown: render with renderMarkdown (sanitised). */
  body: string;
}

export interface ReportVersionListItem {
  number: number;
  publishedAt: string;
  publishedBy: PersonRef;
  note: string;
}

/** A number that moved between two versions. */
export interface ChangedFigure {
  /** The row (site or campaign) or pair it belongs to, e.g. "North Ridge" or "North Ridge − Koru Flat". */
  subject: string;
  /** What the number is, with its unit in words, e.g. "median seeing (″)". */
  figure: string;
  unit: "arcsec" | "cm" | "fraction" | "count";
  before: number | null;
  after: number | null;
  /** after − before, null when either is missing. */
  change: number | null;
}

/** "What changed since version N". */
export interface VersionChanges {
  fromVersion: number;
  toVersion: number;
  titleChanged: boolean;
  summaryChanged: boolean;
  figures: ChangedFigure[];
  /** Rows (sites or campaigns) only in one of the two versions. */
  subjectsAdded: string[];
  subjectsRemoved: string[];
  sections: { id: number; title: string; change: "added" | "removed" | "renamed" | "text" | "renamed_and_text"; previousTitle?: string }[];
  /** Uploads the newer version is computed from that the older was not. */
  uploadsAdded: number;
}

/** One frozen version: `GET /api/reports/:id/versions/:version`. Its numbers never change. */
export interface ReportVersionView {
  reportId: number;
  number: number;
  publishedAt: string;
  publishedBy: PersonRef;
  note: string;
  title: string;
  summary: string;
  sections: ReportSection[];
  /** The comparison as computed at publication: numbers, thinned chart data, window, filters, coefficient sets, monitor settings, uploads. */
  comparison: ComparisonResponse;
  /** The uploads the numbers were computed from, by sha256 of the raw file. */
  uploads: { id: number; fileName: string; sha256: string; campaign: string }[];
  /** The report's other versions. */
  latestNumber: number;
  /** Finished uploads for the report's sites (or campaigns) that this version does not include. */
  newerData: { uploadsSince: number };
  /** Against the previous version (or `?since=N`); null for version 1. */
  changes: VersionChanges | null;
}

/** The lead's working copy (leads and admins only). */
export interface ReportDraft {
  title: string;
  summary: string;
  sections: (ReportSection & { position: number; updatedAt: string })[];
  comparisonQuery: Record<string, string>;
  share: ReportShare;
  /** Whether the draft differs from the latest version (title, summary, sections or comparison settings). */
  unpublishedChanges: boolean;
}

/** `GET /api/reports/:id`. For a committee member `draft` is null and `version` is the latest published one. */
export interface ReportDetail {
  id: number;
  lead: PersonRef;
  status: "draft" | "published";
  versions: ReportVersionListItem[];
  /** The latest published version (null for a draft). */
  version: ReportVersionView | null;
  draft: ReportDraft | null;
  /** What the caller may do here. */
  can: { edit: boolean; publish: boolean; comment: boolean; moderate: boolean };
}

export interface CommentView {
  id: number;
  /** null for a thread's first comment. */
  parentId: number | null;
  author: PersonRef;
  /** null when withdrawn (the text is kept, not shown). */
  body: string | null;
  withdrawn: boolean;
  createdAt: string;
  editedAt: string | null;
  /** The version the comment was written against. */
  version: number;
  /** Whether the caller may still edit it (author, within 15 minutes, not withdrawn). */
  editableUntil: string | null;
}

export interface CommentThread {
  /** The id of the thread's first comment. */
  id: number;
  /** null: on the whole report. */
  sectionId: number | null;
  /** The section's title in the version the thread was started on. */
  sectionTitle: string | null;
  version: number;
  status: "open" | "resolved";
  resolvedBy: PersonRef | null;
  resolvedAt: string | null;
  comments: CommentView[];
  /** Whether the caller may resolve or reopen it. */
  canModerate: boolean;
}

/** `GET /api/reports/:id/comments`: every thread, oldest first. */
export interface ReportComments {
  threads: CommentThread[];
}

/** `GET /api/reports/recipients`: committee members a report can be shared with (leads and admins). */
export interface ReportRecipient {
  id: string;
  name: string;
  email: string;
}
