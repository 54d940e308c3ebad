import {
  comparisonQuerySchema,
  createCommentSchema,
  createReportSchema,
  createSectionSchema,
  mailPreferencesSchema,
  patchCommentSchema,
  patchReportSchema,
  patchSectionSchema,
  publishReportSchema,
  sectionOrderSchema,
  type ComparisonResponse,
  type ReportComments,
} from "@calmcrest/contracts";
import type { User } from "lucia";
import type { AppContext } from "../context";
import { routeId } from "../access/access.server";
import { HttpError, parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";
import { compareForUser } from "../summaries/compare.server";

const READERS = ["admin", "lead", "committee"] as const;
const EDITORS = ["admin", "lead"] as const;

/** /api/reports: committee reports (see store/reports.ts for who reads what). */
export function reportRoutes(context: AppContext): ApiRouter {
  const { store } = context;
  const routes = new ApiRouter("/reports");

  /** The comparison of a report's settings, computed now with the caller's access (400 naming a bad setting). */
  const compute = async (user: User, settings: Record<string, string>): Promise<ComparisonResponse> => {
    const query = parseOr400(comparisonQuerySchema, settings, "The report's comparison settings");
    return compareForUser(context, user, query);
  };
  const comments = async (user: User, reportId: number): Promise<ReportComments> => ({ threads: await store.reports.comments(user, reportId) });

  routes.route("GET", "/", { access: READERS }, async (_req, res) => {
    res.json(await store.reports.list(currentUser(res.locals)));
  });

  routes.route("POST", "/", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    const input = parseOr400(createReportSchema, req.body, "The new report");
    // Computing it once proves the settings name sites or campaigns that exist, before anything is stored.
    await compute(user, input.comparison);
    const reportId = await store.reports.create(user, input);
    res.status(201).json(await store.reports.detail(user, reportId));
  });

  routes.route("GET", "/recipients", { access: EDITORS }, async (_req, res) => {
    res.json(await store.reports.recipients());
  });

  routes.route("GET", "/:id", { access: READERS }, async (req, res) => {
    res.json(await store.reports.detail(currentUser(res.locals), routeId(req.params.id, "That report")));
  });

  routes.route("PATCH", "/:id", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    const reportId = routeId(req.params.id, "That report");
    const input = parseOr400(patchReportSchema, req.body, "The report change");
    if (input.comparison) await compute(user, input.comparison);
    await store.reports.update(user, reportId, input);
    res.json(await store.reports.detail(user, reportId));
  });

  // The comparison as the next publication would freeze it, computed from today's data.
  routes.route("GET", "/:id/preview", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    res.json(await compute(user, await store.reports.comparisonQuery(user, routeId(req.params.id, "That report"))));
  });

  routes.route("POST", "/:id/sections", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    const reportId = routeId(req.params.id, "That report");
    const input = parseOr400(createSectionSchema, req.body, "The new section");
    await store.reports.addSection(user, reportId, input);
    res.status(201).json(await store.reports.detail(user, reportId));
  });

  routes.route("PUT", "/:id/sections/order", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    const reportId = routeId(req.params.id, "That report");
    const input = parseOr400(sectionOrderSchema, req.body, "The section order");
    await store.reports.reorderSections(user, reportId, input.sectionIds);
    res.json(await store.reports.detail(user, reportId));
  });

  routes.route("PATCH", "/:id/sections/:sectionId", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    const reportId = routeId(req.params.id, "That report");
    const input = parseOr400(patchSectionSchema, req.body, "The section change");
    await store.reports.patchSection(user, reportId, routeId(req.params.sectionId, "That section"), input);
    res.json(await store.reports.detail(user, reportId));
  });

  routes.route("DELETE", "/:id/sections/:sectionId", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    const reportId = routeId(req.params.id, "That report");
    await store.reports.deleteSection(user, reportId, routeId(req.params.sectionId, "That section"));
    res.json(await store.reports.detail(user, reportId));
  });

  routes.route("GET", "/:id/versions/:version", { access: READERS }, async (req, res) => {
    const since = req.query.since;
    let sinceNumber: number | undefined;
    if (since !== undefined) {
      sinceNumber = Number(since);
      if (typeof since !== "string" || !Number.isSafeInteger(sinceNumber) || sinceNumber <= 0) {
        throw new HttpError(400, "invalid_input", `since must be the number of an earlier version, like since=1; got "${String(since)}".`, { since: ["Give a version number."] });
      }
    }
    res.json(await store.reports.version(currentUser(res.locals), routeId(req.params.id, "That report"), routeId(req.params.version, "That version"), sinceNumber));
  });

  routes.route("POST", "/:id/versions", { access: EDITORS }, async (req, res) => {
    const user = currentUser(res.locals);
    const reportId = routeId(req.params.id, "That report");
    const { note } = parseOr400(publishReportSchema, req.body ?? {}, "The publication");
    const settings = await store.reports.comparisonQuery(user, reportId);
    const comparison = await compute(user, settings);
    const number = await store.reports.publish(user, reportId, comparison, settings, note);
    res.status(201).json(await store.reports.version(user, reportId, number));
  });

  routes.route("GET", "/:id/comments", { access: READERS }, async (req, res) => {
    res.json(await comments(currentUser(res.locals), routeId(req.params.id, "That report")));
  });

  routes.route("POST", "/:id/comments", { access: READERS }, async (req, res) => {
    const user = currentUser(res.locals);
    const reportId = routeId(req.params.id, "That report");
    const input = parseOr400(createCommentSchema, req.body, "The comment");
    const commentId = await store.reports.addComment(user, reportId, input);
    res.status(201).json({ id: commentId, ...(await comments(user, reportId)) });
  });

  return routes;
}

/** /api/comments/:id: edit, withdraw, resolve or reopen. Answers with the report's threads. */
export function commentRoutes(context: AppContext): ApiRouter {
  const { store } = context;
  const routes = new ApiRouter("/comments");
  routes.route("PATCH", "/:id", { access: READERS }, async (req, res) => {
    const user = currentUser(res.locals);
    const input = parseOr400(patchCommentSchema, req.body, "The comment change");
    const { reportId } = await store.reports.patchComment(user, routeId(req.params.id, "That comment"), input);
    const body: ReportComments = { threads: await store.reports.comments(user, reportId) };
    res.json(body);
  });
  return routes;
}

/** /api/me/preferences: the signed-in person's own e-mail choices. */
export function preferenceRoutes(context: AppContext): ApiRouter {
  const { store } = context;
  const routes = new ApiRouter("/me/preferences");
  routes.route("GET", "/", { access: "signed-in" }, async (_req, res) => {
    res.json(await store.reports.mailPreferences(currentUser(res.locals).id));
  });
  routes.route("PATCH", "/", { access: "signed-in" }, async (req, res) => {
    const user = currentUser(res.locals);
    const input = parseOr400(mailPreferencesSchema, req.body, "The preferences");
    await store.reports.setMailPreferences(user.id, input);
    res.json(await store.reports.mailPreferences(user.id));
  });
  return routes;
}
