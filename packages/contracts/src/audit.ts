import { z } from "zod";
import type { Role } from "./auth";
import { ROLE_LABELS } from "./auth";
import type { createCampaignSchema, patchCampaignSchema, CreateExclusionInput, SavedMapping } from "./campaigns";
import type { CreateReportData, MailPreferences, PatchReportData } from "./reports";
import type { CreateSiteInput, PatchSiteInput } from "./sites";
import type { UploadStatusName } from "./uploads";

// The audit log's fixed vocabulary: every action Calmcrest records, with the details each one carries. The store
// refuses an action that is not listed here, and the TypeScript type of an audit entry ties its details to its
// action, so a row holds what the code chose to record, not whatever the request body held.

/** Recorded for rows the demo seed wrote. */
interface Seeded {
  demo?: boolean;
}

export const ACCOUNT_STATUSES = ["active", "invited", "deactivated"] as const;
export type AccountStatus = (typeof ACCOUNT_STATUSES)[number];

/** Why a sign-in failed (administrators see this; the person signing in gets one answer for all but the limit). */
export type SignInFailure = "bad_credentials" | "deactivated" | "rate_limited";

/** The details recorded with each action. */
export interface AuditDetailsByAction {
  "auth.sign_in": { address: string };
  "auth.sign_in_failed": { email: string; address: string; reason: SignInFailure; knownAccount: boolean };
  "auth.sign_out_everywhere": { by: "self" | "admin" };
  "auth.password_reset_requested": { by: "self" | "admin"; expiresAt: string };
  "auth.password_set": { via: "invitation" | "reset" };
  "user.create": { email: string; name: string; role: Role; via?: "command_line" } & Seeded;
  "user.invite": { email: string; name: string; role: Role; campaignIds: number[]; expiresAt: string };
  "user.role": { from: Role; to: Role; undo?: boolean };
  "user.email": { from: string; to: string };
  "user.deactivate": { email: string };
  "user.reactivate": { email: string };
  "member.add": { campaignId: number; memberId: string; undo?: boolean } & Seeded;
  "member.remove": { campaignId: number; memberId: string };
  "site.create": CreateSiteInput & Seeded;
  "site.update": PatchSiteInput;
  "campaign.create": { siteId: number } & z.output<typeof createCampaignSchema> & Seeded;
  "campaign.update": z.output<typeof patchCampaignSchema>;
  "campaign.saved_mapping": SavedMapping;
  "exclusion.add": { campaignId: number } & CreateExclusionInput & Seeded;
  "exclusion.remove": { campaignId: number; from: string; to: string; reason: string };
  "upload.create": { campaignId: number; fileName: string; sizeBytes: number; sha256: string };
  "upload.retry": { previousStatus: UploadStatusName; previousError: string | null };
  "upload.ingested": { campaignId: number };
  "upload.withdraw": { campaignId: number; reason: string; samples: number; replacedBy?: number };
  "upload.restore": { campaignId: number; reason: string | null; samples: number; withdrawnAt: string | null; withdrawnReason: string | null };
  "upload.reread": { campaignId: number; replaces: number; reason: string; mapping: unknown; monitor: unknown };
  "user.mail-preferences": MailPreferences;
  "report.create": Pick<CreateReportData, "title" | "comparison">;
  "report.edit": PatchReportData;
  "report.share": PatchReportData;
  "report.section.add": { sectionId: number; title: string };
  "report.section.edit": { sectionId: number; renamed: boolean; textChanged: boolean };
  "report.section.reorder": { sectionIds: number[] };
  "report.section.delete": { sectionId: number; title: string };
  "report.publish": { version: number; uploads: number };
  "comment.create": { reportId: number; version: number; sectionId: number | null; parentId: number | null };
  "comment.reply": { reportId: number; version: number; sectionId: number | null; parentId: number | null };
  "comment.edit": { reportId: number };
  "comment.withdraw": { reportId: number };
  "comment.resolve": { reportId: number };
  "comment.reopen": { reportId: number };
}

export type AuditAction = keyof AuditDetailsByAction;

/** Plain words for each action, for the audit page and its CSV. */
export const AUDIT_ACTION_LABELS: Record<AuditAction, string> = {
  "auth.sign_in": "Signed in",
  "auth.sign_in_failed": "Sign-in refused",
  "auth.sign_out_everywhere": "Signed out everywhere",
  "auth.password_reset_requested": "Password link sent",
  "auth.password_set": "Password set",
  "user.create": "Account created",
  "user.invite": "Person invited",
  "user.role": "Role changed",
  "user.email": "E-mail changed",
  "user.deactivate": "Account deactivated",
  "user.reactivate": "Account reactivated",
  "member.add": "Campaign access given",
  "member.remove": "Campaign access removed",
  "site.create": "Site created",
  "site.update": "Site changed",
  "campaign.create": "Campaign created",
  "campaign.update": "Campaign changed",
  "campaign.saved_mapping": "Column mapping saved",
  "exclusion.add": "Time window excluded",
  "exclusion.remove": "Exclusion removed",
  "upload.create": "Log uploaded",
  "upload.retry": "Upload retried",
  "upload.ingested": "Upload read",
  "upload.withdraw": "Upload withdrawn",
  "upload.restore": "Upload restored",
  "upload.reread": "Upload re-read",
  "user.mail-preferences": "E-mail preferences changed",
  "report.create": "Report started",
  "report.edit": "Report changed",
  "report.share": "Report sharing changed",
  "report.section.add": "Report section added",
  "report.section.edit": "Report section changed",
  "report.section.reorder": "Report sections reordered",
  "report.section.delete": "Report section deleted",
  "report.publish": "Report version published",
  "comment.create": "Comment written",
  "comment.reply": "Reply written",
  "comment.edit": "Comment edited",
  "comment.withdraw": "Comment withdrawn",
  "comment.resolve": "Comment thread resolved",
  "comment.reopen": "Comment thread reopened",
};

export const AUDIT_ACTIONS = Object.keys(AUDIT_ACTION_LABELS) as AuditAction[];

export function isAuditAction(value: string): value is AuditAction {
  return Object.hasOwn(AUDIT_ACTION_LABELS, value);
}

export const AUDIT_TARGET_TYPES = ["site", "campaign", "upload", "exclusion", "member", "user", "report", "comment"] as const;
export type AuditTargetType = (typeof AUDIT_TARGET_TYPES)[number];

/** One audit entry as the store writes it: the details' type follows from the action. */
export type AuditEntryOf<A extends AuditAction> = {
  /** The acting user; null for the system (start-up recovery, the demo seed, an unknown person signing in). */
  userId: string | null;
  action: A;
  targetType: AuditTargetType;
  targetId: string | number;
  details: AuditDetailsByAction[A];
};
export type AuditEntry = { [A in AuditAction]: AuditEntryOf<A> }[AuditAction];

/** Query of `GET /api/audit` and `GET /api/audit/export.csv` (administrators). */
export const auditQuerySchema = z.object({
  /** The person who acted. */
  userId: z.string().min(1).optional(),
  action: z.enum(AUDIT_ACTIONS as [AuditAction, ...AuditAction[]], { error: "action must be one of the audit log's actions." }).optional(),
  /** First day (UTC) included. */
  from: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date like 2026-03-01.").optional(),
  /** Last day (UTC) included. */
  to: z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date like 2026-03-01.").optional(),
  page: z.coerce.number().int("page must be a whole number.").min(1, "page starts at 1.").default(1),
  pageSize: z.coerce.number().int().min(1).max(500, "pageSize is at most 500.").default(50),
});
export type AuditQuery = z.output<typeof auditQuerySchema>;

/** One row of the audit page. */
export interface AuditListItem {
  id: number;
  at: string;
  /** Who acted; null for the system or a person not signed in. */
  actor: { id: string; name: string; email: string } | null;
  action: AuditAction;
  targetType: string;
  targetId: string;
  details: Record<string, unknown>;
  /** The action in one plain sentence (from the typed details). */
  summary: string;
}

export interface AuditPage {
  rows: AuditListItem[];
  total: number;
  page: number;
  pageSize: number;
}

const text = (value: unknown) => (typeof value === "string" || typeof value === "number" ? String(value) : "");

/** One plain sentence for an audit row (used on screen and in the CSV). */
export function describeAuditEntry(action: AuditAction, details: Record<string, unknown>, targetId: string, nameOf: (userId: string) => string | undefined = () => undefined): string {
  const person = (value: unknown) => (typeof value === "string" ? (nameOf(value) ?? value) : text(value));
  const role = (value: unknown) => (typeof value === "string" && value in ROLE_LABELS ? ROLE_LABELS[value as Role] : text(value));
  switch (action) {
    case "auth.sign_in":
      return `Signed in from ${text(details.address)}`;
    case "auth.sign_in_failed": {
      const why = details.reason === "rate_limited" ? "too many failures, waiting" : details.reason === "deactivated" ? "account deactivated" : details.knownAccount ? "wrong password" : "no such account";
      return `Sign-in as ${text(details.email)} from ${text(details.address)} refused (${why})`;
    }
    case "auth.sign_out_everywhere":
      return details.by === "admin" ? "Every session ended by an administrator" : "Signed out on every device";
    case "auth.password_reset_requested":
      return `Password link sent (${details.by === "admin" ? "by an administrator" : "asked for by the person"}), valid until ${text(details.expiresAt)}`;
    case "auth.password_set":
      return details.via === "invitation" ? "Chose a password from the invitation" : "Reset the password by e-mail link";
    case "user.create":
      return `Account for ${text(details.name)} <${text(details.email)}> as ${role(details.role)}${details.via === "command_line" ? " (command line)" : ""}`;
    case "user.invite":
      return `Invited ${text(details.name)} <${text(details.email)}> as ${role(details.role)}`;
    case "user.role":
      return `Role ${role(details.from)} → ${role(details.to)}${details.undo ? " (undo)" : ""}`;
    case "user.email":
      return `E-mail ${text(details.from)} → ${text(details.to)}`;
    case "user.deactivate":
      return `Deactivated ${text(details.email)}; every session ended`;
    case "user.reactivate":
      return `Reactivated ${text(details.email)}`;
    case "member.add":
      return `Campaign ${text(details.campaignId)} opened to ${person(details.memberId)}${details.undo ? " (undo)" : ""}`;
    case "member.remove":
      return `Campaign ${text(details.campaignId)} closed to ${person(details.memberId)}`;
    case "exclusion.add":
    case "exclusion.remove":
      return `${AUDIT_ACTION_LABELS[action]} in campaign ${text(details.campaignId)}: ${text(details.from)} to ${text(details.to)} (${text(details.reason)})`;
    case "upload.create":
      return `Uploaded ${text(details.fileName)} to campaign ${text(details.campaignId)}`;
    case "upload.withdraw":
      return `Upload ${targetId} withdrawn from campaign ${text(details.campaignId)} (${text(details.samples)} samples set aside): ${text(details.reason)}`;
    case "upload.restore":
      return `Upload ${targetId} restored to campaign ${text(details.campaignId)} (${text(details.samples)} samples count again)`;
    case "upload.reread":
      return `Upload ${text(details.replaces)} re-read as upload ${targetId}: ${text(details.reason)}`;
    case "report.create":
      return `Report ${targetId} started: ${text(details.title)}`;
    case "report.publish":
      return `Report ${targetId} version ${text(details.version)} published (${text(details.uploads)} uploads frozen)`;
    case "comment.create":
    case "comment.reply":
    case "comment.edit":
    case "comment.withdraw":
    case "comment.resolve":
    case "comment.reopen":
      return `${AUDIT_ACTION_LABELS[action]} on report ${text(details.reportId)}`;
    default:
      return `${AUDIT_ACTION_LABELS[action]} (${targetId})`;
  }
}
