import { existsSync } from "node:fs";
import { dirname, join, sep } from "node:path";
import { fileURLToPath } from "node:url";
import express, { type Express } from "express";
import expressStaticGzip from "express-static-gzip";
import type { AppContext } from "./context";
import { apiNotFoundHandler, errorHandler } from "./http/errors";
import { securityHeaders } from "./http/security-headers";
import { loadSession, originCheck } from "./http/session";
import { apiRouters } from "./routes/index";

const webDist = join(dirname(fileURLToPath(import.meta.url)), "../../web/dist");
const webAssets = join(webDist, "assets") + sep;

export function createApp(context: AppContext): Express {
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", "loopback");
  app.use(securityHeaders(context.env));

  const api = express.Router();
  api.use(express.json({ limit: "1mb" }));
  api.use(originCheck(context.env.allowedOrigins));
  api.use(loadSession(context.lucia));
  for (const routes of apiRouters(context)) api.use(routes.mount, routes.router);
  api.use(apiNotFoundHandler);
  app.use("/api", api);

  // In production one process serves the built web app too; every non-API path gets index.html (client routing).
  if (existsSync(join(webDist, "index.html"))) {
    // The build's brotli or gzip copy when the browser accepts one (apps/web/vite.config.ts makes them), else the
    // file itself. Files under /assets/ carry a hash of their content in their name, so browsers may keep them for
    // a year without asking again; anything else is checked after an hour.
    app.use(
      expressStaticGzip(webDist, {
        enableBrotli: true,
        orderPreference: ["br", "gz"],
        index: false,
        serveStatic: {
          index: false,
          setHeaders: (res, path) => {
            res.setHeader("Cache-Control", path.startsWith(webAssets) ? "public, max-age=31536000, immutable" : "public, max-age=3600");
          },
        },
      }),
    );
    app.get("/{*splat}", (_req, res) => {
      res.setHeader("Cache-Control", "no-cache");
      res.sendFile(join(webDist, "index.html"));
    });
  } else {
    app.get("/", (_req, res) => {
      res
        .status(503)
        .type("text/plain")
        .send("The Calmcrest web app is not built yet. Run `npm start` (it builds it) or `npm run dev` for the development server.");
    });
  }

  app.use(errorHandler);
  return app;
}
