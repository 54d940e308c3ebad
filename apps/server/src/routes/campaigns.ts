import { addMemberSchema, createExclusionSchema, patchCampaignSchema, samplesQuerySchema, savedMappingSchema, summaryQuerySchema, type VisibleCampaign } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { FIELD_ROLES, routeId } from "../access/access.server";
import { parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";
import { sendAnswer } from "../summaries/summary-service.server";

/**
 * /api/campaigns/:id and what hangs off one campaign (exclusions, members, summary, samples). Committee members
 * are refused by each route's guard (403); the rest is checked per campaign by store.campaigns.forUser with the
 * action named beside the route (not visible: 404; visible but not allowed: 403).
 */
export function campaignRoutes(context: AppContext): ApiRouter {
  const { store, summaries } = context;
  const routes = new ApiRouter("/campaigns");
  const campaignId = (value: string | string[] | undefined) => routeId(value, "That campaign");

  // The caller's visible campaigns, each with its site's name: what the upload wizard, Compare and the access page list.
  routes.route("GET", "/", { access: FIELD_ROLES }, async (_req, res) => {
    const visible = await store.sites.listVisible(currentUser(res.locals));
    const siteNames = new Map<number, string>();
    const siteOrder = new Map<number, number>();
    visible.forEach(({ site }, index) => {
      siteNames.set(site.id, site.name);
      siteOrder.set(site.id, index);
    });
    const items = await store.campaigns.listItems(visible.flatMap(({ campaignIds }) => campaignIds));
    // Sites by name (as GET /api/sites lists them), then each site's campaigns in the order they were created.
    items.sort((left, right) => (siteOrder.get(left.siteId) ?? 0) - (siteOrder.get(right.siteId) ?? 0) || left.id - right.id);
    const answer: VisibleCampaign[] = items.map((item) => ({ ...item, siteName: siteNames.get(item.siteId) ?? "" }));
    res.json(answer);
  });

  routes.route("GET", "/:id", { access: FIELD_ROLES, campaignAction: "read" }, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await store.campaigns.forUser(user, campaignId(req.params.id), "read");
    res.json(await store.campaigns.detail(user, campaign.id));
  });

  routes.route("PATCH", "/:id", { access: FIELD_ROLES, campaignAction: "edit" }, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await store.campaigns.forUser(user, campaignId(req.params.id), "edit");
    const input = parseOr400(patchCampaignSchema, req.body, "The campaign change");
    await store.campaigns.update(user.id, campaign.id, input);
    res.json(await store.campaigns.detail(user, campaign.id));
  });

  routes.route("PUT", "/:id/saved-mapping", { access: FIELD_ROLES, campaignAction: "upload" }, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await store.campaigns.forUser(user, campaignId(req.params.id), "upload");
    const input = parseOr400(savedMappingSchema, req.body, "The saved mapping");
    await store.campaigns.saveMapping(user.id, campaign.id, input);
    res.json(await store.campaigns.detail(user, campaign.id));
  });

  routes.route("POST", "/:id/exclusions", { access: FIELD_ROLES, campaignAction: "exclude" }, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await store.campaigns.forUser(user, campaignId(req.params.id), "exclude");
    const input = parseOr400(createExclusionSchema, req.body, "The exclusion");
    res.status(201).json(await store.exclusions.add(user.id, campaign.id, input));
  });

  routes.route("DELETE", "/:id/exclusions/:exclusionId", { access: FIELD_ROLES, campaignAction: "exclude" }, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await store.campaigns.forUser(user, campaignId(req.params.id), "exclude");
    await store.exclusions.remove(user.id, campaign.id, routeId(req.params.exclusionId, "That exclusion"));
    res.status(204).end();
  });

  routes.route("POST", "/:id/members", { access: FIELD_ROLES, campaignAction: "manageMembers" }, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await store.campaigns.forUser(user, campaignId(req.params.id), "manageMembers");
    const input = parseOr400(addMemberSchema, req.body, "The new member");
    await store.memberships.add(user.id, campaign.id, input.userId);
    res.status(201).json(await store.campaigns.detail(user, campaign.id));
  });

  routes.route("DELETE", "/:id/members/:userId", { access: FIELD_ROLES, campaignAction: "manageMembers" }, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = await store.campaigns.forUser(user, campaignId(req.params.id), "manageMembers");
    await store.memberships.remove(user.id, campaign.id, String(req.params.userId));
    res.status(204).end();
  });

  routes.route("GET", "/:id/summary", { access: FIELD_ROLES, campaignAction: "read" }, async (req, res) => {
    const campaign = await store.campaigns.forUser(currentUser(res.locals), campaignId(req.params.id), "read");
    const query = parseOr400(summaryQuerySchema, req.query, "The summary query");
    const site = await store.campaigns.siteOf(campaign);
    const answer = await summaries.summary({ kind: "campaign", site, campaigns: [campaign], query, ingestRejections: () => store.uploads.ingestRejections([campaign.id]) });
    sendAnswer(req, res, answer);
  });

  routes.route("GET", "/:id/samples", { access: FIELD_ROLES, campaignAction: "read" }, async (req, res) => {
    const campaign = await store.campaigns.forUser(currentUser(res.locals), campaignId(req.params.id), "read");
    const query = parseOr400(samplesQuerySchema, req.query, "The samples query");
    const site = await store.campaigns.siteOf(campaign);
    sendAnswer(req, res, await summaries.series([campaign.id], site.longitude, query));
  });

  return routes;
}
