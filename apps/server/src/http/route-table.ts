import { Router, type RequestHandler } from "express";
import { ROLES, type Role } from "@calmcrest/contracts";
import type { CampaignAction } from "../access/access.server";
import { requireRole, requireUser } from "./session";

/** Who may call a route: anyone, any signed-in user, or the listed roles (others: 403; no session: 401). */
export type RouteAccess = "public" | "signed-in" | readonly Role[];

export type RouteMethod = "GET" | "POST" | "PUT" | "PATCH" | "DELETE";

/** One row of the server's route table: what the role-matrix test and the docs read. */
export interface RouteTableEntry {
  method: RouteMethod;
  /** Full path as mounted, e.g. /api/campaigns/:id/exclusions. */
  path: string;
  /** Roles the route's guard lets through; null for a public route. */
  roles: readonly Role[] | null;
  /**
   * For routes on one campaign (or its uploads): the action checked per campaign after the guard
   * (store.campaigns.forUser): not visible to the user -> 404, visible but the role may not -> 403.
   */
  campaignAction?: CampaignAction;
}

export interface RouteOptions {
  access: RouteAccess;
  campaignAction?: CampaignAction;
}

/**
 * A router mounted at one path that declares each route's guard beside the route and records it in the route
 * table. `route("GET", "/:id", { access: FIELD_ROLES }, handler)` = requireUser + requireRole(...FIELD_ROLES) +
 * handler, and a table row GET <mount>/:id.
 */
export class ApiRouter {
  readonly router: Router;
  readonly table: RouteTableEntry[] = [];

  constructor(
    /** Where app.ts mounts it, relative to /api (e.g. "/sites"). */
    readonly mount: string,
  ) {
    // mergeParams: routers mounted at a path with parameters (/campaigns/:id/uploads) read them too.
    this.router = Router({ mergeParams: true });
  }

  route(method: RouteMethod, path: string, options: RouteOptions, ...handlers: RequestHandler[]): this {
    const guards: RequestHandler[] =
      options.access === "public" ? [] : options.access === "signed-in" ? [requireUser] : [requireUser, requireRole(...options.access)];
    const fullPath = `/api${this.mount}${path === "/" ? "" : path}`;
    this.table.push({
      method,
      path: fullPath,
      roles: options.access === "public" ? null : options.access === "signed-in" ? ROLES : options.access,
      ...(options.campaignAction ? { campaignAction: options.campaignAction } : {}),
    });
    const register = {
      GET: this.router.get,
      POST: this.router.post,
      PUT: this.router.put,
      PATCH: this.router.patch,
      DELETE: this.router.delete,
    }[method].bind(this.router);
    register(path, ...guards, ...handlers);
    return this;
  }
}
