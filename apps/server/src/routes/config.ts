import type { AppConfig } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { ApiRouter } from "../http/route-table";

/** /api/config: what the web app needs before sign-in (map tiles). */
export function configRoutes({ env }: AppContext): ApiRouter {
  const routes = new ApiRouter("/config");
  routes.route("GET", "/", { access: "public" }, (_req, res) => {
    const config: AppConfig = {
      mapTiles: env.CALMCREST_TILE_URL ? { url: env.CALMCREST_TILE_URL, attribution: env.CALMCREST_TILE_ATTRIBUTION ?? "" } : null,
    };
    res.json(config);
  });
  return routes;
}

/** /api/health: answers as long as the process serves requests. */
export function healthRoutes(_context: AppContext): ApiRouter {
  const routes = new ApiRouter("/health");
  routes.route("GET", "/", { access: "public" }, (_req, res) => {
    res.json({ ok: true });
  });
  return routes;
}
