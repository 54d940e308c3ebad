import type { Router } from "express";
import type { AppContext } from "../context";
import { campaignRoutes } from "./campaigns";
import { configRoutes } from "./config";
import { siteRoutes } from "./sites";
import { uploadRoutes } from "./uploads";
import { userRoutes } from "./users";

// Each API area registers its router factory here (sites, campaigns, uploads, …). Mounted under /api after auth.
export const apiRouteModules: ((context: AppContext) => Router)[] = [configRoutes, siteRoutes, campaignRoutes, uploadRoutes, userRoutes];
