import { Router } from "express";
import type { User } from "lucia";
import {
  addMemberSchema,
  createCampaignSchema,
  createExclusionSchema,
  instantMs,
  patchCampaignSchema,
  samplesQuerySchema,
  savedMappingSchema,
  summaryQuerySchema,
  type CampaignDetail,
  type CampaignMember,
  type SavedMapping,
} from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { campaignFor, FIELD_ROLES, roleAllows, routeId, siteFor, type CampaignRow, type SiteRow } from "../access/access.server";
import { recordAudit } from "../audit/audit.server";
import { HttpError, notFound, parseOr400 } from "../http/errors";
import { currentUser, requireRole, requireUser } from "../http/session";
import { writeSlot } from "../ingest/ingest-queue.server";
import { ingestRejections } from "../summaries/ingest-rejections.server";
import { sampleSeries } from "../summaries/sample-series.server";
import { buildSummary, resolveQuery } from "../summaries/summarize.server";
import { campaignListItem, campaignStats, exclusionQuery, exclusionView, uploadListItem, uploadQuery } from "../views.server";

export function campaignRoutes(context: AppContext): Router {
  const { db, samples } = context;
  const knex = db.knex;
  const router = Router();
  // Committee members read published reports only (403); everyone else is checked per campaign.
  router.use("/campaigns", requireUser, requireRole(...FIELD_ROLES), writeSlot(context.ingest));

  async function campaignDetail(user: User, campaign: CampaignRow): Promise<CampaignDetail> {
    const site = await knex("site").where({ id: campaign.site_id }).first<SiteRow>();
    const stats = await campaignStats(knex, [campaign.id]);
    const uploads = await uploadQuery(knex).where("upload.campaign_id", campaign.id).orderBy("upload.id");
    const exclusions = await exclusionQuery(knex).where("exclusion.campaign_id", campaign.id).orderBy("exclusion.from_ms");
    const showMembers = user.role === "admin" || user.role === "lead";
    const members = showMembers
      ? await knex("campaign_member")
          .join("user", "user.id", "campaign_member.user_id")
          .where("campaign_member.campaign_id", campaign.id)
          .orderBy("user.name")
          .select<{ user_id: string; name: string; email: string; role: string; added_at: string }[]>(
            "campaign_member.user_id",
            "user.name",
            "user.email",
            "user.role",
            "campaign_member.added_at",
          )
      : [];
    return {
      ...campaignListItem(campaign, stats.get(campaign.id)),
      siteName: site.name,
      site: { id: site.id, name: site.name, latitude: site.latitude, longitude: site.longitude, elevationM: site.elevation_m },
      notes: campaign.notes,
      createdAt: campaign.created_at,
      updatedAt: campaign.updated_at,
      uploads: uploads.map(uploadListItem),
      exclusions: exclusions.map(exclusionView),
      members: members.map(
        (member): CampaignMember => ({ userId: member.user_id, name: member.name, email: member.email, role: member.role, addedAt: member.added_at }),
      ),
      savedMapping: campaign.saved_mapping ? (JSON.parse(campaign.saved_mapping) as SavedMapping) : null,
      can: {
        upload: roleAllows(user.role, "upload"),
        exclude: roleAllows(user.role, "exclude"),
        manageMembers: roleAllows(user.role, "manageMembers"),
        edit: roleAllows(user.role, "edit"),
      },
    };
  }

  async function reload(campaignId: number): Promise<CampaignRow> {
    const row = await knex("campaign").where({ id: campaignId }).first<CampaignRow | undefined>();
    if (!row) throw notFound("That campaign");
    return row;
  }

  router.post("/sites/:id/campaigns", requireUser, requireRole("admin", "lead"), async (req, res) => {
    const user = currentUser(res.locals);
    const { site } = await siteFor(knex, user, routeId(req.params.id, "That site"));
    const input = parseOr400(createCampaignSchema, req.body, "The new campaign");
    const now = new Date().toISOString();
    const [inserted] = await knex("campaign")
      .insert({
        site_id: site.id,
        name: input.name,
        aperture_mm: input.monitor.apertureMm,
        baseline_mm: input.monitor.baselineMm,
        wavelength_nm: input.monitor.wavelengthNm,
        pixel_scale_arcsec: input.monitor.pixelScaleArcsec ?? null,
        exposure_ms: input.monitor.exposureMs ?? null,
        height_above_ground_m: input.monitor.heightAboveGroundM ?? null,
        response: input.monitor.response,
        start_date: input.startDate ?? null,
        end_date: input.endDate ?? null,
        status: input.status,
        notes: input.notes ?? "",
        created_by: user.id,
        created_at: now,
        updated_at: now,
      })
      .returning<{ id: number }[]>("id");
    if (!inserted) throw new HttpError(500, "server_error", "The campaign could not be stored. Try again.");
    await recordAudit(knex, { userId: user.id, action: "campaign.create", targetType: "campaign", targetId: inserted.id, details: { siteId: site.id, ...input } });
    samples.briefs.clear();
    res.status(201).json(await campaignDetail(user, await reload(inserted.id)));
  });

  router.get("/campaigns/:id", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "read");
    res.json(await campaignDetail(user, campaign));
  });

  router.patch("/campaigns/:id", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "edit");
    const input = parseOr400(patchCampaignSchema, req.body, "The campaign change");
    const changes: Record<string, unknown> = { updated_at: new Date().toISOString() };
    if (input.monitor) {
      // Stored samples were computed with the current monitor settings; changing them would mix two calibrations.
      const upload = await knex("upload").where({ campaign_id: campaign.id }).first();
      if (upload) {
        throw new HttpError(
          409,
          "campaign_has_uploads",
          "The monitor settings cannot change once a campaign has uploads (its samples were computed with them). Create a new campaign for the new settings.",
        );
      }
      Object.assign(changes, {
        aperture_mm: input.monitor.apertureMm,
        baseline_mm: input.monitor.baselineMm,
        wavelength_nm: input.monitor.wavelengthNm,
        pixel_scale_arcsec: input.monitor.pixelScaleArcsec ?? null,
        exposure_ms: input.monitor.exposureMs ?? null,
        height_above_ground_m: input.monitor.heightAboveGroundM ?? null,
        response: input.monitor.response,
      });
    }
    if (input.name !== undefined) changes.name = input.name;
    if (input.startDate !== undefined) changes.start_date = input.startDate;
    if (input.endDate !== undefined) changes.end_date = input.endDate;
    if (input.status !== undefined) changes.status = input.status;
    if (input.notes !== undefined) changes.notes = input.notes;
    const startDate = input.startDate !== undefined ? input.startDate : campaign.start_date;
    const endDate = input.endDate !== undefined ? input.endDate : campaign.end_date;
    if (startDate && endDate && startDate > endDate) {
      throw new HttpError(400, "invalid_input", "The campaign change has invalid fields. endDate: endDate must not be before startDate.", {
        endDate: ["endDate must not be before startDate."],
      });
    }
    await knex("campaign").where({ id: campaign.id }).update(changes);
    await recordAudit(knex, { userId: user.id, action: "campaign.update", targetType: "campaign", targetId: campaign.id, details: { ...input } });
    res.json(await campaignDetail(user, await reload(campaign.id)));
  });

  router.put("/campaigns/:id/saved-mapping", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "upload");
    const input = parseOr400(savedMappingSchema, req.body, "The saved mapping");
    await knex("campaign").where({ id: campaign.id }).update({ saved_mapping: JSON.stringify(input), updated_at: new Date().toISOString() });
    await recordAudit(knex, { userId: user.id, action: "campaign.saved_mapping", targetType: "campaign", targetId: campaign.id, details: { ...input } });
    res.json(await campaignDetail(user, await reload(campaign.id)));
  });

  router.post("/campaigns/:id/exclusions", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "exclude");
    const input = parseOr400(createExclusionSchema, req.body, "The exclusion");
    const [inserted] = await knex("exclusion")
      .insert({
        campaign_id: campaign.id,
        from_ms: instantMs(input.from),
        to_ms: instantMs(input.to),
        reason: input.reason,
        created_by: user.id,
        created_at: new Date().toISOString(),
      })
      .returning<{ id: number }[]>("id");
    if (!inserted) throw new HttpError(500, "server_error", "The exclusion could not be stored. Try again.");
    await recordAudit(knex, { userId: user.id, action: "exclusion.add", targetType: "exclusion", targetId: inserted.id, details: { campaignId: campaign.id, ...input } });
    samples.invalidate(campaign.id);
    const row = await exclusionQuery(knex).where("exclusion.id", inserted.id).first();
    if (!row) throw notFound("That exclusion");
    res.status(201).json(exclusionView(row));
  });

  router.delete("/campaigns/:id/exclusions/:exclusionId", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "exclude");
    const exclusionId = routeId(req.params.exclusionId, "That exclusion");
    const row = await knex("exclusion").where({ id: exclusionId, campaign_id: campaign.id }).first<{ id: number; from_ms: number; to_ms: number; reason: string } | undefined>();
    if (!row) throw notFound("That exclusion");
    await knex("exclusion").where({ id: row.id }).delete();
    await recordAudit(knex, {
      userId: user.id,
      action: "exclusion.remove",
      targetType: "exclusion",
      targetId: row.id,
      details: { campaignId: campaign.id, from: new Date(row.from_ms).toISOString(), to: new Date(row.to_ms).toISOString(), reason: row.reason },
    });
    samples.invalidate(campaign.id);
    res.status(204).end();
  });

  router.post("/campaigns/:id/members", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "manageMembers");
    const input = parseOr400(addMemberSchema, req.body, "The new member");
    const member = await knex("user").where({ id: input.userId }).first<{ id: string; role: string } | undefined>();
    if (!member) {
      throw new HttpError(400, "invalid_input", "The new member has invalid fields. userId: no user has that id.", { userId: ["No user has that id."] });
    }
    const inserted = await knex("campaign_member")
      .insert({ campaign_id: campaign.id, user_id: member.id, added_at: new Date().toISOString() })
      .onConflict(["campaign_id", "user_id"])
      .ignore();
    if (inserted.length > 0) {
      await recordAudit(knex, { userId: user.id, action: "member.add", targetType: "member", targetId: `${campaign.id}:${member.id}`, details: { campaignId: campaign.id, memberId: member.id } });
    }
    res.status(201).json(await campaignDetail(user, campaign));
  });

  router.delete("/campaigns/:id/members/:userId", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "manageMembers");
    const removed = await knex("campaign_member").where({ campaign_id: campaign.id, user_id: req.params.userId }).delete();
    if (removed === 0) throw notFound("That membership");
    await recordAudit(knex, { userId: user.id, action: "member.remove", targetType: "member", targetId: `${campaign.id}:${req.params.userId}`, details: { campaignId: campaign.id, memberId: req.params.userId } });
    samples.briefs.clear();
    res.status(204).end();
  });

  router.get("/campaigns/:id/summary", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "read");
    const query = parseOr400(summaryQuerySchema, req.query, "The summary query");
    const site = await knex("site").where({ id: campaign.site_id }).first<SiteRow>();
    const rejections = await ingestRejections(knex, [campaign.id]);
    res.json(buildSummary(samples, { kind: "campaign", site, campaigns: [campaign], resolved: resolveQuery(query), ingestRejections: rejections }));
  });

  router.get("/campaigns/:id/samples", async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await campaignFor(knex, user, routeId(req.params.id, "That campaign"), "read");
    const query = parseOr400(samplesQuerySchema, req.query, "The samples query");
    const site = await knex("site").where({ id: campaign.site_id }).first<SiteRow>();
    res.json(sampleSeries(samples, [campaign.id], site.longitude, query));
  });

  return router;
}
