import type { User } from "lucia";
import { createCampaignSchema, createSiteSchema, patchSiteSchema, samplesQuerySchema, summaryQuerySchema, type SiteDetail, type SiteListItem } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { FIELD_ROLES, routeId } from "../access/access.server";
import { parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";
import { sendAnswer } from "../summaries/summary-service.server";
import { siteListItem, type SiteRow } from "../store/index";

/** /api/sites: the candidate sites, their summaries and samples, and new campaigns at a site. */
export function siteRoutes(context: AppContext): ApiRouter {
  const { store, summaries } = context;
  const routes = new ApiRouter("/sites");

  async function listItem(site: SiteRow, campaignIds: number[], campaignCountAtSite: number): Promise<SiteListItem> {
    return siteListItem(site, campaignIds.length, campaignIds.length === 0 ? null : await summaries.brief(site, campaignIds), campaignCountAtSite);
  }

  async function siteDetail(user: User, siteId: number): Promise<SiteDetail> {
    const { site, campaignIds, campaignCountAtSite } = await store.sites.forUser(user, siteId);
    return {
      ...(await listItem(site, campaignIds, campaignCountAtSite)),
      createdAt: site.created_at,
      updatedAt: site.updated_at,
      campaigns: await store.campaigns.listItems(campaignIds),
    };
  }

  // Committee members read published reports only (403); everyone else is checked per item.
  routes.route("GET", "/", { access: FIELD_ROLES }, async (_req, res) => {
    const visible = await store.sites.listVisible(currentUser(res.locals));
    res.json(await Promise.all(visible.map(({ site, campaignIds, campaignCountAtSite }) => listItem(site, campaignIds, campaignCountAtSite))));
  });

  routes.route("POST", "/", { access: ["admin", "lead"] }, async (req, res) => {
    const user = currentUser(res.locals);
    const input = parseOr400(createSiteSchema, req.body, "The new site");
    const siteId = await store.sites.create(user.id, input);
    res.status(201).json(await siteDetail(user, siteId));
  });

  routes.route("GET", "/:id", { access: FIELD_ROLES }, async (req, res) => {
    res.json(await siteDetail(currentUser(res.locals), routeId(req.params.id, "That site")));
  });

  routes.route("PATCH", "/:id", { access: ["admin", "lead"] }, async (req, res) => {
    const user = currentUser(res.locals);
    const { site } = await store.sites.forUser(user, routeId(req.params.id, "That site"));
    const input = parseOr400(patchSiteSchema, req.body, "The site change");
    await store.sites.update(user.id, site.id, input);
    res.json(await siteDetail(user, site.id));
  });

  routes.route("GET", "/:id/summary", { access: FIELD_ROLES }, async (req, res) => {
    const { site, campaignIds } = await store.sites.forUser(currentUser(res.locals), routeId(req.params.id, "That site"));
    const query = parseOr400(summaryQuerySchema, req.query, "The summary query");
    const campaigns = await store.campaigns.listByIds(campaignIds);
    const answer = await summaries.summary({ kind: "site", site, campaigns, query, ingestRejections: () => store.uploads.ingestRejections(campaignIds) });
    sendAnswer(req, res, answer);
  });

  routes.route("GET", "/:id/samples", { access: FIELD_ROLES }, async (req, res) => {
    const { site, campaignIds } = await store.sites.forUser(currentUser(res.locals), routeId(req.params.id, "That site"));
    const query = parseOr400(samplesQuerySchema, req.query, "The samples query");
    sendAnswer(req, res, await summaries.series(campaignIds, site.longitude, query));
  });

  routes.route("POST", "/:id/campaigns", { access: ["admin", "lead"] }, async (req, res) => {
    const user = currentUser(res.locals);
    const { site } = await store.sites.forUser(user, routeId(req.params.id, "That site"));
    const input = parseOr400(createCampaignSchema, req.body, "The new campaign");
    const campaignId = await store.campaigns.create(user.id, site.id, input);
    res.status(201).json(await store.campaigns.detail(user, campaignId));
  });

  return routes;
}
