import { Router } from "express";
import type { User } from "lucia";
import { createSiteSchema, patchSiteSchema, samplesQuerySchema, summaryQuerySchema, type SiteDetail, type SiteListItem } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { FIELD_ROLES, routeId, siteFor, visibleCampaignIds, type CampaignRow, type SiteRow } from "../access/access.server";
import { recordAudit } from "../audit/audit.server";
import { HttpError, parseOr400 } from "../http/errors";
import { currentUser, requireRole, requireUser } from "../http/session";
import { writeSlot } from "../ingest/ingest-queue.server";
import { buildSummary, resolveQuery, siteBrief } from "../summaries/summarize.server";
import { ingestRejections } from "../summaries/ingest-rejections.server";
import { sampleSeries } from "../summaries/sample-series.server";
import { campaignListItem, campaignStats } from "../views.server";

export function siteRoutes(context: AppContext): Router {
  const { db, samples } = context;
  const knex = db.knex;
  const router = Router();
  // Committee members read published reports only (403); everyone else is checked per item below.
  router.use("/sites", requireUser, requireRole(...FIELD_ROLES), writeSlot(context.ingest));

  function listItem(site: SiteRow, campaignIds: number[]): SiteListItem {
    return {
      id: site.id,
      name: site.name,
      latitude: site.latitude,
      longitude: site.longitude,
      elevationM: site.elevation_m,
      notes: site.notes,
      campaignCount: campaignIds.length,
      summary: campaignIds.length === 0 ? null : siteBrief(samples, site, campaignIds),
    };
  }

  async function siteDetail(user: User, siteId: number): Promise<SiteDetail> {
    const { site, campaignIds } = await siteFor(knex, user, siteId);
    const campaigns = await knex("campaign").whereIn("id", campaignIds).orderBy("id").select<CampaignRow[]>("*");
    const stats = await campaignStats(knex, campaignIds);
    return {
      ...listItem(site, campaignIds),
      createdAt: site.created_at,
      updatedAt: site.updated_at,
      campaigns: campaigns.map((campaign) => campaignListItem(campaign, stats.get(campaign.id))),
    };
  }

  router.get("/sites", async (_req, res) => {
    const user = currentUser(res.locals);
    const visible = await visibleCampaignIds(knex, user);
    const sites = await knex("site").orderBy("name").select<SiteRow[]>("*");
    const campaigns = await knex("campaign").select<{ id: number; site_id: number }[]>("id", "site_id").orderBy("id");
    const bySite = new Map<number, number[]>();
    for (const campaign of campaigns) {
      if (visible !== "all" && !visible.includes(campaign.id)) continue;
      const list = bySite.get(campaign.site_id) ?? [];
      list.push(campaign.id);
      bySite.set(campaign.site_id, list);
    }
    const items = sites
      // Engineers see only the sites where they belong to a campaign.
      .filter((site) => visible === "all" || bySite.has(site.id))
      .map((site) => listItem(site, bySite.get(site.id) ?? []));
    res.json(items);
  });

  router.post("/sites", requireRole("admin", "lead"), async (req, res) => {
    const user = currentUser(res.locals);
    const input = parseOr400(createSiteSchema, req.body, "The new site");
    const now = new Date().toISOString();
    const [inserted] = await knex("site")
      .insert({
        name: input.name,
        latitude: input.latitude,
        longitude: input.longitude,
        elevation_m: input.elevationM,
        notes: input.notes ?? "",
        created_by: user.id,
        created_at: now,
        updated_at: now,
      })
      .returning<{ id: number }[]>("id");
    if (!inserted) throw new HttpError(500, "server_error", "The site could not be stored. Try again.");
    await recordAudit(knex, { userId: user.id, action: "site.create", targetType: "site", targetId: inserted.id, details: { ...input } });
    res.status(201).json(await siteDetail(user, inserted.id));
  });

  router.get("/sites/:id", async (req, res) => {
    res.json(await siteDetail(currentUser(res.locals), routeId(req.params.id, "That site")));
  });

  router.patch("/sites/:id", requireRole("admin", "lead"), async (req, res) => {
    const user = currentUser(res.locals);
    const { site } = await siteFor(knex, user, routeId(req.params.id, "That site"));
    const input = parseOr400(patchSiteSchema, req.body, "The site change");
    const movesSite =
      (input.latitude !== undefined && input.latitude !== site.latitude) || (input.longitude !== undefined && input.longitude !== site.longitude);
    if (movesSite) {
      // Stored samples carry the sun altitude computed from the old coordinates; moving the site would silently
      // make the night filter wrong for them.
      const uploads = await knex("campaign").join("upload", "upload.campaign_id", "campaign.id").where("campaign.site_id", site.id).first();
      if (uploads) {
        throw new HttpError(
          409,
          "site_has_samples",
          "This site already has uploads, whose sun altitudes were computed from its current coordinates. Create a new site for the corrected position instead.",
        );
      }
    }
    const changes: Record<string, unknown> = { updated_at: new Date().toISOString() };
    if (input.name !== undefined) changes.name = input.name;
    if (input.latitude !== undefined) changes.latitude = input.latitude;
    if (input.longitude !== undefined) changes.longitude = input.longitude;
    if (input.elevationM !== undefined) changes.elevation_m = input.elevationM;
    if (input.notes !== undefined) changes.notes = input.notes;
    await knex("site").where({ id: site.id }).update(changes);
    await recordAudit(knex, { userId: user.id, action: "site.update", targetType: "site", targetId: site.id, details: { ...input } });
    samples.briefs.clear();
    res.json(await siteDetail(user, site.id));
  });

  router.get("/sites/:id/summary", async (req, res) => {
    const user = currentUser(res.locals);
    const { site, campaignIds } = await siteFor(knex, user, routeId(req.params.id, "That site"));
    const query = parseOr400(summaryQuerySchema, req.query, "The summary query");
    const campaigns = await knex("campaign").whereIn("id", campaignIds).orderBy("id").select<CampaignRow[]>("*");
    const rejections = await ingestRejections(knex, campaignIds);
    res.json(buildSummary(samples, { kind: "site", site, campaigns, resolved: resolveQuery(query), ingestRejections: rejections }));
  });

  router.get("/sites/:id/samples", async (req, res) => {
    const user = currentUser(res.locals);
    const { site, campaignIds } = await siteFor(knex, user, routeId(req.params.id, "That site"));
    const query = parseOr400(samplesQuerySchema, req.query, "The samples query");
    res.json(sampleSeries(samples, campaignIds, site.longitude, query));
  });

  return router;
}
