import type { Knex } from "knex";
import type { User } from "lucia";
import {
  COMMENT_EDIT_WINDOW_MS,
  SUGGESTED_SECTIONS,
  type CommentThread,
  type CommentView,
  type ComparisonResponse,
  type CreateCommentData,
  type CreateReportData,
  type PatchCommentInput,
  type PatchReportData,
  type PatchSectionData,
  type PersonRef,
  type ReportDetail,
  type ReportDraft,
  type ReportListItem,
  type ReportRecipient,
  type ReportSection,
  type ReportShare,
  type ReportVersionListItem,
  type ReportVersionView,
} from "@calmcrest/contracts";
import { HttpError, notFound } from "../http/errors";
import { composeMail } from "../mail/compose";
import { versionChanges, type VersionContent } from "../reports/changes";
import type { StoreCore } from "./core";
import { queueMail } from "./outbox";

// Committee reports: the lead's working copy (title, summary, comparison settings, sections, sharing), frozen
// versions, and the comments on them. Who reads what:
//   lead, admin: every report, drafts included; they edit and publish.
//   committee:   only reports with a published version that are shared with them (all members by default, or by
//                name); anything else is a 404, as if it did not exist.
//   engineer:    none (the route guard answers 403).
// E-mails are queued in the same transaction as the change they report (queueMail).

interface ReportRow {
  id: number;
  title: string;
  summary: string;
  comparison_query: string;
  lead_id: string | null;
  share_mode: "all" | "named";
  created_at: string;
  updated_at: string;
}

interface SectionRow {
  id: number;
  report_id: number;
  position: number;
  title: string;
  body: string;
  deleted: number | boolean;
  updated_at: string;
}

interface VersionRow {
  id: number;
  report_id: number;
  number: number;
  published_at: string;
  published_by: string | null;
  note: string;
  title: string;
  summary: string;
  sections: string;
  comparison_query: string;
  comparison: string;
  upload_ids: string;
}

interface CommentRow {
  id: number;
  report_id: number;
  section_id: number | null;
  version_number: number;
  parent_id: number | null;
  author_id: string | null;
  body: string;
  created_at: string;
  edited_at: string | null;
  withdrawn_at: string | null;
  resolved_at: string | null;
  resolved_by: string | null;
}

type Db = Knex | Knex.Transaction;
const FORMER_ACCOUNT: PersonRef = { id: "", name: "a former account" };

const mayEdit = (user: User) => user.role === "lead" || user.role === "admin";

async function people(db: Db, ids: (string | null)[]): Promise<Map<string, PersonRef & { email: string; role: string; commentEmails: boolean }>> {
  const wanted = [...new Set(ids.filter((id): id is string => id !== null))];
  if (wanted.length === 0) return new Map();
  const rows = await db("user").whereIn("id", wanted).select<{ id: string; name: string; email: string; role: string; comment_emails: number | boolean }[]>("id", "name", "email", "role", "comment_emails");
  return new Map(rows.map((row) => [row.id, { id: row.id, name: row.name, email: row.email, role: row.role, commentEmails: Boolean(row.comment_emails) }]));
}

const personOf = (map: Map<string, PersonRef>, id: string | null): PersonRef => {
  const person = id === null ? undefined : map.get(id);
  return person ? { id: person.id, name: person.name } : FORMER_ACCOUNT;
};

function versionContent(row: VersionRow): VersionContent {
  return {
    number: row.number,
    title: row.title,
    summary: row.summary,
    sections: JSON.parse(row.sections) as ReportSection[],
    comparison: JSON.parse(row.comparison) as ComparisonResponse,
    uploadIds: JSON.parse(row.upload_ids) as number[],
  };
}

/** The uploads a frozen comparison was computed from, once each, with their campaign. */
function comparisonUploads(comparison: ComparisonResponse): ReportVersionView["uploads"] {
  const seen = new Map<number, ReportVersionView["uploads"][number]>();
  for (const row of comparison.rows) {
    for (const campaign of row.campaigns) {
      for (const upload of campaign.uploads) {
        if (!seen.has(upload.id)) seen.set(upload.id, { id: upload.id, fileName: upload.fileName, sha256: upload.sha256, campaign: `${row.site.name} — ${campaign.name}` });
      }
    }
  }
  return [...seen.values()];
}

/** What a comparison compares, in words, from its settings (before any version exists). */
function subjectsOf(comparison: ComparisonResponse | null): string[] {
  return comparison ? comparison.rows.map((row) => row.label) : [];
}

export function reportsStore(core: StoreCore) {
  const knex = () => core.knex;
  const link = (path: string) => `${core.publicBaseUrl}${path}`;

  async function versionsOf(db: Db, reportId: number): Promise<VersionRow[]> {
    return db("report_version").where({ report_id: reportId }).orderBy("number").select<VersionRow[]>("*");
  }

  async function sharedWith(db: Db, reportId: number): Promise<string[]> {
    return (await db("report_share").where({ report_id: reportId }).select<{ user_id: string }[]>("user_id")).map((row) => row.user_id);
  }

  /** Whether this committee member may read the report: published, and shared with everyone or with them. */
  async function committeeMayRead(db: Db, user: User, report: ReportRow): Promise<boolean> {
    const version = await db("report_version").where({ report_id: report.id }).first("id");
    if (!version) return false;
    if (report.share_mode === "all") return true;
    return Boolean(await db("report_share").where({ report_id: report.id, user_id: user.id }).first("user_id"));
  }

  /** The report, or the same 404 for one that does not exist and one the user may not read. */
  async function readable(db: Db, user: User, reportId: number): Promise<ReportRow> {
    const report = await db("report").where({ id: reportId }).first<ReportRow | undefined>();
    if (!report) throw notFound("That report");
    if (mayEdit(user)) return report;
    if (user.role === "committee" && (await committeeMayRead(db, user, report))) return report;
    throw notFound("That report");
  }

  /** The report for a change by a lead or admin (others: 404 if they cannot see it, else 403). */
  async function editable(db: Db, user: User, reportId: number): Promise<ReportRow> {
    const report = await readable(db, user, reportId);
    if (!mayEdit(user)) throw new HttpError(403, "forbidden", "Only survey leads and administrators change reports.");
    return report;
  }

  async function liveSections(db: Db, reportId: number): Promise<SectionRow[]> {
    return db("report_section").where({ report_id: reportId, deleted: false }).orderBy("position").orderBy("id").select<SectionRow[]>("*");
  }

  async function shareOf(db: Db, report: ReportRow): Promise<ReportShare> {
    if (report.share_mode === "all") return { mode: "all" };
    return { mode: "named", userIds: await sharedWith(db, report.id) };
  }

  function draftDiffers(report: ReportRow, sections: SectionRow[], latest: VersionRow | undefined): boolean {
    if (!latest) return true;
    const frozen = JSON.parse(latest.sections) as ReportSection[];
    const current: ReportSection[] = sections.map((section) => ({ id: section.id, title: section.title, body: section.body }));
    return latest.title !== report.title || latest.summary !== report.summary || latest.comparison_query !== report.comparison_query || JSON.stringify(frozen) !== JSON.stringify(current);
  }

  /** Finished uploads for the version's sites (every campaign of a site row; the campaign of a campaign row) that it does not include. */
  async function uploadsSince(version: VersionContent): Promise<number> {
    const siteIds = version.comparison.rows.filter((row) => row.campaignId === null).map((row) => row.site.id);
    const campaignIds = version.comparison.rows.flatMap((row) => (row.campaignId === null ? [] : [row.campaignId]));
    const query = knex()("upload")
      .join("campaign", "campaign.id", "upload.campaign_id")
      .where("upload.status", "done")
      .where((where) => {
        void where.whereIn("campaign.site_id", siteIds).orWhereIn("campaign.id", campaignIds);
      });
    if (version.uploadIds.length > 0) void query.whereNotIn("upload.id", version.uploadIds);
    const row = await query.count<{ n: number }[]>({ n: "upload.id" }).first();
    return Number(row?.n ?? 0);
  }

  async function versionView(reportId: number, versions: VersionRow[], number: number, since?: number): Promise<ReportVersionView> {
    const row = versions.find((candidate) => candidate.number === number);
    if (!row) throw notFound(`Version ${number} of that report`);
    const latest = versions[versions.length - 1];
    const content = versionContent(row);
    const sinceNumber = since ?? number - 1;
    if (since !== undefined && (since >= number || !versions.some((candidate) => candidate.number === since))) {
      throw new HttpError(400, "invalid_input", `since must be the number of an earlier version of this report (1 to ${number - 1}); got ${since}.`, { since: ["Choose an earlier version."] });
    }
    const older = versions.find((candidate) => candidate.number === sinceNumber);
    const names = await people(knex(), [row.published_by]);
    return {
      reportId,
      number: row.number,
      publishedAt: row.published_at,
      publishedBy: personOf(names, row.published_by),
      note: row.note,
      title: content.title,
      summary: content.summary,
      sections: content.sections,
      comparison: content.comparison,
      uploads: comparisonUploads(content.comparison),
      latestNumber: latest?.number ?? number,
      newerData: { uploadsSince: await uploadsSince(content) },
      changes: older ? versionChanges(versionContent(older), content) : null,
    };
  }

  function versionListItem(row: VersionRow, names: Map<string, PersonRef>): ReportVersionListItem {
    return { number: row.number, publishedAt: row.published_at, publishedBy: personOf(names, row.published_by), note: row.note };
  }

  async function openThreadCounts(reportIds: number[]): Promise<Map<number, number>> {
    if (reportIds.length === 0) return new Map();
    const rows = await knex()("report_comment")
      .whereIn("report_id", reportIds)
      .whereNull("parent_id")
      .whereNull("resolved_at")
      .whereNull("withdrawn_at")
      .groupBy("report_id")
      .select<{ report_id: number; n: number }[]>("report_id", knex().raw("count(*) as n"));
    return new Map(rows.map((row) => [row.report_id, Number(row.n)]));
  }

  /** Committee members a report's publication e-mail goes to. */
  async function publicationRecipients(trx: Knex.Transaction, report: ReportRow) {
    const query = trx("user").where({ role: "committee" }).orderBy("name").select<{ id: string; email: string; name: string }[]>("id", "email", "name");
    if (report.share_mode === "named") void query.whereIn("id", trx("report_share").where({ report_id: report.id }).select("user_id"));
    return query;
  }

  function commentEmailFooter() {
    return "You receive this because you take part in this discussion or lead the report. To stop comment e-mails, turn them off on your Account page in Calmcrest (publication e-mails keep coming).";
  }

  /** Queues a comment e-mail to each recipient (not the actor, not those who turned comment e-mails off). */
  async function queueCommentMail(
    trx: Knex.Transaction,
    recipients: (string | null)[],
    actorId: string,
    build: (recipient: { id: string; name: string; email: string }) => Parameters<typeof queueMail>[1],
  ) {
    const map = await people(trx, recipients);
    for (const person of map.values()) {
      if (person.id === actorId || !person.commentEmails) continue;
      await queueMail(trx, build(person));
    }
  }

  async function threadParticipants(trx: Knex.Transaction, rootId: number): Promise<(string | null)[]> {
    const rows = await trx("report_comment")
      .where({ id: rootId })
      .orWhere({ parent_id: rootId })
      .select<{ author_id: string | null }[]>("author_id");
    return rows.map((row) => row.author_id);
  }

  async function commentRow(db: Db, commentId: number): Promise<CommentRow> {
    const row = await db("report_comment").where({ id: commentId }).first<CommentRow | undefined>();
    if (!row) throw notFound("That comment");
    return row;
  }

  function sectionTitleIn(version: VersionRow | undefined, sectionId: number | null): string | null {
    if (sectionId === null || !version) return null;
    return (JSON.parse(version.sections) as ReportSection[]).find((section) => section.id === sectionId)?.title ?? null;
  }

  function commentLinks(reportId: number, versionNumber: number, latestNumber: number, sectionId: number | null, commentId: number) {
    const versionPart = versionNumber === latestNumber ? "" : `?version=${versionNumber}`;
    return [
      { label: "Open the comment", url: link(`/reports/${reportId}${versionPart}#comment-${commentId}`) },
      ...(sectionId === null ? [] : [{ label: "Open the section", url: link(`/reports/${reportId}${versionPart}#section-${sectionId}`) }]),
    ];
  }

  const store = {
    /** The reports the user may read, most recently changed first. */
    async list(user: User): Promise<ReportListItem[]> {
      const reports = await knex()("report").orderBy("updated_at", "desc").orderBy("id", "desc").select<ReportRow[]>("*");
      const versions = await knex()("report_version")
        .orderBy("number")
        .select<Pick<VersionRow, "report_id" | "number" | "published_at" | "published_by" | "comparison" | "title" | "summary">[]>("report_id", "number", "published_at", "published_by", "comparison", "title", "summary");
      const visible: ReportRow[] = [];
      for (const report of reports) {
        if (mayEdit(user)) visible.push(report);
        else if (user.role === "committee" && (await committeeMayRead(knex(), user, report))) visible.push(report);
      }
      const names = await people(knex(), [...visible.map((report) => report.lead_id), ...versions.map((version) => version.published_by)]);
      const open = await openThreadCounts(visible.map((report) => report.id));
      const items: ReportListItem[] = [];
      for (const report of visible) {
        const mine = versions.filter((version) => version.report_id === report.id);
        const latest = mine[mine.length - 1];
        const subjects = latest ? subjectsOf(JSON.parse(latest.comparison) as ComparisonResponse) : [];
        let unpublishedChanges = false;
        if (mayEdit(user)) {
          const full = latest ? await knex()("report_version").where({ report_id: report.id, number: latest.number }).first<VersionRow>() : undefined;
          unpublishedChanges = draftDiffers(report, await liveSections(knex(), report.id), full);
        }
        // Readers who see no draft get the title and summary of the latest published version, never the draft's.
        const published = latest && !mayEdit(user) ? latest : null;
        items.push({
          id: report.id,
          title: published?.title ?? report.title,
          summary: published?.summary ?? report.summary,
          status: latest ? "published" : "draft",
          lead: personOf(names, report.lead_id),
          latestVersion: latest ? { number: latest.number, publishedAt: latest.published_at, publishedBy: personOf(names, latest.published_by) } : null,
          versionCount: mine.length,
          subjects,
          openThreads: open.get(report.id) ?? 0,
          updatedAt: report.updated_at,
          unpublishedChanges,
        });
      }
      return items;
    },

    /** `GET /api/reports/:id`. */
    async detail(user: User, reportId: number): Promise<ReportDetail> {
      const report = await readable(knex(), user, reportId);
      const versions = await versionsOf(knex(), reportId);
      const latest = versions[versions.length - 1];
      const names = await people(knex(), [report.lead_id, ...versions.map((version) => version.published_by)]);
      let draft: ReportDraft | null = null;
      if (mayEdit(user)) {
        const sections = await liveSections(knex(), reportId);
        draft = {
          title: report.title,
          summary: report.summary,
          sections: sections.map((section) => ({ id: section.id, title: section.title, body: section.body, position: section.position, updatedAt: section.updated_at })),
          comparisonQuery: JSON.parse(report.comparison_query) as Record<string, string>,
          share: await shareOf(knex(), report),
          unpublishedChanges: draftDiffers(report, sections, latest),
        };
      }
      return {
        id: report.id,
        lead: personOf(names, report.lead_id),
        status: latest ? "published" : "draft",
        versions: versions.map((version) => versionListItem(version, names)),
        version: latest ? await versionView(reportId, versions, latest.number) : null,
        draft,
        can: { edit: mayEdit(user), publish: mayEdit(user), comment: Boolean(latest), moderate: mayEdit(user) },
      };
    },

    /** `GET /api/reports/:id/versions/:version` (`since`: compare with that version instead of the previous one). */
    async version(user: User, reportId: number, number: number, since?: number): Promise<ReportVersionView> {
      await readable(knex(), user, reportId);
      return versionView(reportId, await versionsOf(knex(), reportId), number, since);
    },

    /** The comparison settings of the working copy (what a publication computes). */
    async comparisonQuery(user: User, reportId: number): Promise<Record<string, string>> {
      const report = await editable(knex(), user, reportId);
      return JSON.parse(report.comparison_query) as Record<string, string>;
    },

    /** Committee members, for the sharing choice. */
    async recipients(): Promise<ReportRecipient[]> {
      return knex()("user").where({ role: "committee" }).orderBy("name").select<ReportRecipient[]>("id", "name", "email");
    },

    create(user: User, input: CreateReportData): Promise<number> {
      return core.write(async ({ trx, audit }) => {
        const now = new Date().toISOString();
        const [inserted] = await trx("report")
          .insert({ title: input.title, summary: input.summary, comparison_query: JSON.stringify(input.comparison), lead_id: user.id, share_mode: "all", created_at: now, updated_at: now })
          .returning<{ id: number }[]>("id");
        if (!inserted) throw new Error("The report row was not written.");
        const sections = input.sections ?? SUGGESTED_SECTIONS.map((title) => ({ title, body: "" }));
        for (const [position, section] of sections.entries()) {
          await trx("report_section").insert({ report_id: inserted.id, position, title: section.title, body: section.body, updated_at: now });
        }
        await audit({ userId: user.id, action: "report.create", targetType: "report", targetId: inserted.id, details: { title: input.title, comparison: input.comparison } });
        return inserted.id;
      });
    },

    update(user: User, reportId: number, input: PatchReportData): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await editable(trx, user, reportId);
        const changes: Record<string, unknown> = { updated_at: new Date().toISOString() };
        if (input.title !== undefined) changes.title = input.title;
        if (input.summary !== undefined) changes.summary = input.summary;
        if (input.comparison !== undefined) changes.comparison_query = JSON.stringify(input.comparison);
        if (input.share !== undefined) {
          changes.share_mode = input.share.mode;
          await trx("report_share").where({ report_id: reportId }).delete();
          if (input.share.mode === "named") {
            const ids = [...new Set(input.share.userIds)];
            const committee = await trx("user").whereIn("id", ids).where({ role: "committee" }).select<{ id: string }[]>("id");
            if (committee.length !== ids.length) {
              throw new HttpError(400, "invalid_input", "Reports can be shared only with committee members; one of the chosen people is not (or no longer) a committee member. Reload the list and choose again.", { share: ["Choose committee members only."] });
            }
            await trx("report_share").insert(ids.map((userId) => ({ report_id: reportId, user_id: userId })));
          }
        }
        await trx("report").where({ id: reportId }).update(changes);
        await audit({ userId: user.id, action: input.share !== undefined ? "report.share" : "report.edit", targetType: "report", targetId: reportId, details: { ...input } });
      });
    },

    addSection(user: User, reportId: number, input: { title: string; body: string; position?: number | undefined }): Promise<number> {
      return core.write(async ({ trx, audit }) => {
        await editable(trx, user, reportId);
        const sections = await liveSections(trx, reportId);
        const position = Math.min(input.position ?? sections.length, sections.length);
        const now = new Date().toISOString();
        const [inserted] = await trx("report_section").insert({ report_id: reportId, position, title: input.title, body: input.body, updated_at: now }).returning<{ id: number }[]>("id");
        if (!inserted) throw new Error("The section row was not written.");
        const order = sections.map((section) => section.id);
        order.splice(position, 0, inserted.id);
        for (const [index, id] of order.entries()) await trx("report_section").where({ id }).update({ position: index });
        await trx("report").where({ id: reportId }).update({ updated_at: now });
        await audit({ userId: user.id, action: "report.section.add", targetType: "report", targetId: reportId, details: { sectionId: inserted.id, title: input.title } });
        return inserted.id;
      });
    },

    patchSection(user: User, reportId: number, sectionId: number, input: PatchSectionData): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await editable(trx, user, reportId);
        const section = await trx("report_section").where({ id: sectionId, report_id: reportId, deleted: false }).first<SectionRow | undefined>();
        if (!section) throw notFound("That section");
        const now = new Date().toISOString();
        await trx("report_section")
          .where({ id: sectionId })
          .update({ ...(input.title !== undefined ? { title: input.title } : {}), ...(input.body !== undefined ? { body: input.body } : {}), updated_at: now });
        await trx("report").where({ id: reportId }).update({ updated_at: now });
        await audit({ userId: user.id, action: "report.section.edit", targetType: "report", targetId: reportId, details: { sectionId, renamed: input.title !== undefined && input.title !== section.title, textChanged: input.body !== undefined && input.body !== section.body } });
      });
    },

    reorderSections(user: User, reportId: number, sectionIds: number[]): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await editable(trx, user, reportId);
        const current = (await liveSections(trx, reportId)).map((section) => section.id);
        const same = current.length === sectionIds.length && new Set(sectionIds).size === sectionIds.length && sectionIds.every((id) => current.includes(id));
        if (!same) {
          throw new HttpError(409, "sections_changed", "The list of sections does not match the report's sections (someone may have added or deleted one). Reload the report and reorder again.", { sectionIds: ["List every section of the report once."] });
        }
        for (const [position, id] of sectionIds.entries()) await trx("report_section").where({ id }).update({ position });
        await trx("report").where({ id: reportId }).update({ updated_at: new Date().toISOString() });
        await audit({ userId: user.id, action: "report.section.reorder", targetType: "report", targetId: reportId, details: { sectionIds } });
      });
    },

    /** Removes a section from the working copy; published versions and comments on it are untouched. */
    deleteSection(user: User, reportId: number, sectionId: number): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await editable(trx, user, reportId);
        const section = await trx("report_section").where({ id: sectionId, report_id: reportId, deleted: false }).first<SectionRow | undefined>();
        if (!section) throw notFound("That section");
        await trx("report_section").where({ id: sectionId }).update({ deleted: true, updated_at: new Date().toISOString() });
        const rest = await liveSections(trx, reportId);
        for (const [position, row] of rest.entries()) await trx("report_section").where({ id: row.id }).update({ position });
        await trx("report").where({ id: reportId }).update({ updated_at: new Date().toISOString() });
        await audit({ userId: user.id, action: "report.section.delete", targetType: "report", targetId: reportId, details: { sectionId, title: section.title } });
      });
    },

    /**
     * Publishes the working copy as the next version, freezing `comparison` (computed just before from the report's
     * settings) with the sections, and e-mails every committee member it is shared with, in the same transaction.
     */
    publish(user: User, reportId: number, comparison: ComparisonResponse, comparisonQuery: Record<string, string>, note: string): Promise<number> {
      return core.write(async ({ trx, audit }) => {
        const report = await editable(trx, user, reportId);
        if (report.comparison_query !== JSON.stringify(comparisonQuery)) {
          throw new HttpError(409, "report_changed", "The report's comparison settings changed while it was being published. Publish again.");
        }
        const sections = await liveSections(trx, reportId);
        if (sections.length === 0) throw new HttpError(409, "no_sections", "A report needs at least one section before it can be published. Add a section (for example Results) and publish again.");
        const last = await trx("report_version").where({ report_id: reportId }).max<{ n: number | null }>({ n: "number" }).first();
        const number = Number(last?.n ?? 0) + 1;
        const now = new Date().toISOString();
        const frozenSections: ReportSection[] = sections.map((section) => ({ id: section.id, title: section.title, body: section.body }));
        const uploadIds = comparisonUploads(comparison).map((upload) => upload.id);
        await trx("report_version").insert({
          report_id: reportId,
          number,
          published_at: now,
          published_by: user.id,
          note,
          title: report.title,
          summary: report.summary,
          sections: JSON.stringify(frozenSections),
          comparison_query: report.comparison_query,
          comparison: JSON.stringify(comparison),
          upload_ids: JSON.stringify(uploadIds),
        });
        await trx("report").where({ id: reportId }).update({ updated_at: now });
        await audit({ userId: user.id, action: "report.publish", targetType: "report", targetId: reportId, details: { version: number, uploads: uploadIds.length } });
        const publisher = (await people(trx, [user.id])).get(user.id)?.name ?? "The survey lead";
        const url = link(`/reports/${reportId}?version=${number}`);
        for (const recipient of await publicationRecipients(trx, report)) {
          const parts = composeMail({
            heading: `Version ${number} of “${report.title}” is published`,
            paragraphs: [
              `${publisher} published version ${number} on ${now.slice(0, 10)}. It compares ${subjectsOf(comparison).join(", ") || "the chosen sites"} and is computed from ${uploadIds.length} upload${uploadIds.length === 1 ? "" : "s"}.`,
              ...(note ? [`What is new: ${note}`] : []),
              "You can read it and comment on any section in Calmcrest.",
            ],
            links: [{ label: "Read the report", url }],
            footer: "You receive this because the report is shared with you as a member of the site-selection committee.",
          });
          await queueMail(trx, { kind: "report_published", to: recipient.email, toUserId: recipient.id, subject: `Report published: ${report.title} (version ${number})`, ...parts });
        }
        return number;
      });
    },

    /** Every thread of the report, oldest first, with the caller's rights on each. */
    async comments(user: User, reportId: number): Promise<CommentThread[]> {
      const report = await readable(knex(), user, reportId);
      const rows = await knex()("report_comment").where({ report_id: reportId }).orderBy("id").select<CommentRow[]>("*");
      const versions = await versionsOf(knex(), reportId);
      const names = await people(knex(), rows.flatMap((row) => [row.author_id, row.resolved_by]));
      const now = Date.now();
      const view = (row: CommentRow): CommentView => {
        const editableUntilMs = Date.parse(row.created_at) + COMMENT_EDIT_WINDOW_MS;
        const withdrawn = row.withdrawn_at !== null;
        return {
          id: row.id,
          parentId: row.parent_id,
          author: personOf(names, row.author_id),
          body: withdrawn ? null : row.body,
          withdrawn,
          createdAt: row.created_at,
          editedAt: row.edited_at,
          version: row.version_number,
          editableUntil: !withdrawn && row.author_id === user.id && editableUntilMs > now ? new Date(editableUntilMs).toISOString() : null,
        };
      };
      return rows
        .filter((row) => row.parent_id === null)
        .map((root) => ({
          id: root.id,
          sectionId: root.section_id,
          sectionTitle: sectionTitleIn(versions.find((version) => version.number === root.version_number), root.section_id),
          version: root.version_number,
          status: root.resolved_at ? "resolved" : "open",
          resolvedBy: root.resolved_by ? personOf(names, root.resolved_by) : null,
          resolvedAt: root.resolved_at,
          comments: [root, ...rows.filter((row) => row.parent_id === root.id)].map(view),
          canModerate: mayEdit(user) || root.author_id === user.id || report.lead_id === user.id,
        }));
    },

    /** A new thread or a reply, against a published version; e-mails the lead (new thread) or the participants (reply). */
    addComment(user: User, reportId: number, input: CreateCommentData): Promise<number> {
      return core.write(async ({ trx, audit }) => {
        const report = await readable(trx, user, reportId);
        const versions = await versionsOf(trx, reportId);
        const version = versions.find((candidate) => candidate.number === input.version);
        if (!version) {
          throw new HttpError(400, "invalid_input", versions.length === 0 ? "This report has no published version yet; comments are made on published versions." : `version must be a published version of this report (1 to ${versions.length}); got ${input.version}.`, { version: ["Choose a published version."] });
        }
        let rootId: number | null = null;
        let sectionId = input.sectionId;
        if (input.parentId !== null) {
          const parent = await commentRow(trx, input.parentId);
          if (parent.report_id !== reportId) throw notFound("The comment you reply to");
          rootId = parent.parent_id ?? parent.id;
          const root = await commentRow(trx, rootId);
          sectionId = root.section_id;
        } else if (sectionId !== null && sectionTitleIn(version, sectionId) === null) {
          throw new HttpError(400, "invalid_input", `Version ${input.version} has no section ${sectionId}. Comment on one of its sections, or on the whole report.`, { sectionId: ["Choose a section of this version."] });
        }
        const now = new Date().toISOString();
        const [inserted] = await trx("report_comment")
          .insert({ report_id: reportId, section_id: sectionId, version_number: input.version, parent_id: rootId, author_id: user.id, body: input.body, created_at: now })
          .returning<{ id: number }[]>("id");
        if (!inserted) throw new Error("The comment row was not written.");
        await audit({ userId: user.id, action: rootId === null ? "comment.create" : "comment.reply", targetType: "comment", targetId: inserted.id, details: { reportId, version: input.version, sectionId, parentId: rootId } });

        const author = (await people(trx, [user.id])).get(user.id)?.name ?? "Someone";
        const latestNumber = versions[versions.length - 1]?.number ?? input.version;
        const where = sectionId === null ? "the whole report" : `section “${sectionTitleIn(version, sectionId) ?? "?"}”`;
        const links = commentLinks(reportId, input.version, latestNumber, sectionId, inserted.id);
        const recipients = rootId === null ? [report.lead_id] : [...(await threadParticipants(trx, rootId)), report.lead_id];
        await queueCommentMail(trx, recipients, user.id, (person) => ({
          kind: rootId === null ? "comment_new" : "comment_reply",
          to: person.email,
          toUserId: person.id,
          subject: rootId === null ? `New comment on “${version.title}”: ${where}` : `Reply on “${version.title}”: ${where}`,
          ...composeMail({
            heading: rootId === null ? `${author} commented on ${where} of “${version.title}” (version ${input.version})` : `${author} replied in a thread on ${where} of “${version.title}”`,
            quote: { author, markdown: input.body },
            links,
            footer: commentEmailFooter(),
          }),
        }));
        return inserted.id;
      });
    },

    /** Edit (author, within 15 minutes), withdraw (author), resolve or reopen (lead, admin, report's lead or the thread's author). */
    patchComment(user: User, commentId: number, input: PatchCommentInput): Promise<{ reportId: number }> {
      return core.write(async ({ trx, audit }) => {
        const comment = await commentRow(trx, commentId);
        const report = await readable(trx, user, comment.report_id).catch(() => {
          throw notFound("That comment");
        });
        const now = new Date();
        if (input.action === "edit" || input.action === "withdraw") {
          if (comment.author_id !== user.id) throw new HttpError(403, "not_author", `Only the author of a comment can ${input.action === "edit" ? "edit" : "withdraw"} it.`);
          if (comment.withdrawn_at) throw new HttpError(409, "withdrawn", "This comment was withdrawn; it can no longer be changed. Write a new comment instead.");
          if (input.action === "edit") {
            if (now.getTime() - Date.parse(comment.created_at) > COMMENT_EDIT_WINDOW_MS) {
              throw new HttpError(409, "edit_window_closed", "A comment can be edited for 15 minutes after it was written. Reply to it instead to add or correct something.");
            }
            await trx("report_comment").where({ id: commentId }).update({ body: input.body, edited_at: now.toISOString() });
            await audit({ userId: user.id, action: "comment.edit", targetType: "comment", targetId: commentId, details: { reportId: report.id } });
          } else {
            await trx("report_comment").where({ id: commentId }).update({ withdrawn_at: now.toISOString() });
            await audit({ userId: user.id, action: "comment.withdraw", targetType: "comment", targetId: commentId, details: { reportId: report.id } });
          }
          return { reportId: report.id };
        }
        const root = comment.parent_id === null ? comment : await commentRow(trx, comment.parent_id);
        const mayModerate = mayEdit(user) || root.author_id === user.id || report.lead_id === user.id;
        if (!mayModerate) throw new HttpError(403, "forbidden", "Only the report's lead, an administrator or the person who started the thread can resolve or reopen it.");
        if (input.action === "resolve") {
          if (root.resolved_at) return { reportId: report.id };
          await trx("report_comment").where({ id: root.id }).update({ resolved_at: now.toISOString(), resolved_by: user.id });
          await audit({ userId: user.id, action: "comment.resolve", targetType: "comment", targetId: root.id, details: { reportId: report.id } });
          const versions = await versionsOf(trx, report.id);
          const version = versions.find((candidate) => candidate.number === root.version_number);
          const resolver = (await people(trx, [user.id])).get(user.id)?.name ?? "Someone";
          const where = root.section_id === null ? "the whole report" : `section “${sectionTitleIn(version, root.section_id) ?? "?"}”`;
          const title = version?.title ?? report.title;
          await queueCommentMail(trx, await threadParticipants(trx, root.id), user.id, (person) => ({
            kind: "thread_resolved",
            to: person.email,
            toUserId: person.id,
            subject: `Thread resolved on “${title}”: ${where}`,
            ...composeMail({
              heading: `${resolver} marked a thread on ${where} of “${title}” as resolved`,
              paragraphs: ["It can be reopened from the report page if something is still open."],
              links: commentLinks(report.id, root.version_number, versions[versions.length - 1]?.number ?? root.version_number, root.section_id, root.id),
              footer: commentEmailFooter(),
            }),
          }));
        } else {
          if (!root.resolved_at) return { reportId: report.id };
          await trx("report_comment").where({ id: root.id }).update({ resolved_at: null, resolved_by: null });
          await audit({ userId: user.id, action: "comment.reopen", targetType: "comment", targetId: root.id, details: { reportId: report.id } });
        }
        return { reportId: report.id };
      });
    },

    /** Whether the user gets comment e-mails (publication e-mails always come). */
    async mailPreferences(userId: string): Promise<{ commentEmails: boolean }> {
      const row = await knex()("user").where({ id: userId }).first<{ comment_emails: number | boolean } | undefined>("comment_emails");
      if (!row) throw notFound("That account");
      return { commentEmails: Boolean(row.comment_emails) };
    },

    setMailPreferences(userId: string, preferences: { commentEmails: boolean }): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await trx("user").where({ id: userId }).update({ comment_emails: preferences.commentEmails });
        await audit({ userId, action: "user.mail-preferences", targetType: "user", targetId: userId, details: preferences });
      });
    },
  };
  return store;
}

export type ReportsStore = ReturnType<typeof reportsStore>;
