import type { Router } from "express";
import type { AppContext } from "../context";

// Each API area registers its router factory here (sites, campaigns, uploads, …). Mounted under /api after auth.
export const apiRouteModules: ((context: AppContext) => Router)[] = [];
