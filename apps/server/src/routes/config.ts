import { Router } from "express";
import type { AppConfig } from "@calmcrest/contracts";
import type { AppContext } from "../context";

export function configRoutes({ env }: AppContext): Router {
  const router = Router();
  router.get("/config", (_req, res) => {
    const config: AppConfig = {
      mapTiles: env.CALMCREST_TILE_URL ? { url: env.CALMCREST_TILE_URL, attribution: env.CALMCREST_TILE_ATTRIBUTION ?? "" } : null,
    };
    res.json(config);
  });
  return router;
}
