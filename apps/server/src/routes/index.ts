import type { AppContext } from "../context";
import type { ApiRouter, RouteTableEntry } from "../http/route-table";
import { auditRoutes } from "./audit";
import { authRoutes, meRoutes } from "./auth";
import { campaignRoutes } from "./campaigns";
import { comparisonRoutes } from "./comparisons";
import { configRoutes, healthRoutes } from "./config";
import { outboxRoutes } from "./outbox";
import { commentRoutes, preferenceRoutes, reportRoutes } from "./reports";
import { siteRoutes } from "./sites";
import { campaignUploadRoutes, uploadRoutes } from "./uploads";
import { userRoutes } from "./users";

// Each API area registers its router factory here. app.ts mounts every router at its own path under /api; each
// route declares its guard beside it (ApiRouter.route), so order here does not change who may call what.
export const apiRouteModules: ((context: AppContext) => ApiRouter)[] = [
  healthRoutes,
  configRoutes,
  authRoutes,
  meRoutes,
  siteRoutes,
  campaignRoutes,
  comparisonRoutes,
  campaignUploadRoutes,
  uploadRoutes,
  userRoutes,
  outboxRoutes,
  reportRoutes,
  commentRoutes,
  preferenceRoutes,
  auditRoutes,
];

export function apiRouters(context: AppContext): ApiRouter[] {
  return apiRouteModules.map((routes) => routes(context));
}

/** Every API route with the roles its guard lets through (what the role-matrix test walks). */
export function routeTable(context: AppContext): RouteTableEntry[] {
  return apiRouters(context).flatMap((routes) => routes.table);
}
