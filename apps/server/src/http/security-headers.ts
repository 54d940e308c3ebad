import helmet from "helmet";
import type { RequestHandler } from "express";
import type { Env } from "../env.server";

/**
 * The CSP source for a Leaflet tile URL template: its scheme and host, with a `{s}` (or any other `{…}`) in the
 * host turned into a `*` wildcard label (https://{s}.tiles.example.org/{z}/{x}/{y}.png -> https://*.tiles.example.org).
 */
export function tileSource(tileUrl: string): string {
  const match = /^(https?):\/\/([^/?#]+)/i.exec(tileUrl);
  if (!match?.[1] || !match[2]) throw new Error(`CALMCREST_TILE_URL is not an http(s) address: ${tileUrl}`);
  const host = match[2].replace(/\{[^}]*\}/g, "*");
  return `${match[1].toLowerCase()}://${host}`;
}

/**
 * Security headers on every response, HTML and API alike (helmet). The content security policy allows only what
 * the built web app loads: its own scripts, styles and fonts (no inline script), Leaflet's data: URI images, and
 * the tile host when CALMCREST_TILE_URL is configured. HSTS only in production (over https).
 */
export function securityHeaders(env: Pick<Env, "NODE_ENV" | "CALMCREST_TILE_URL" | "CALMCREST_PUBLIC_URL">): RequestHandler {
  const production = env.NODE_ENV === "production";
  const tiles = env.CALMCREST_TILE_URL ? [tileSource(env.CALMCREST_TILE_URL)] : [];
  const servedOverHttps = env.CALMCREST_PUBLIC_URL?.toLowerCase().startsWith("https://") ?? false;
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        "default-src": ["'self'"],
        "base-uri": ["'self'"],
        "script-src": ["'self'"],
        "script-src-attr": ["'none'"],
        "style-src": ["'self'"],
        "img-src": ["'self'", "data:", ...tiles],
        "font-src": ["'self'"],
        "connect-src": ["'self'"],
        "form-action": ["'self'"],
        "frame-ancestors": ["'none'"],
        "object-src": ["'none'"],
        "manifest-src": ["'self'"],
        "worker-src": ["'self'"],
        // Upgrading makes sense only where the site is served over https; on http://localhost it would break the app.
        ...(servedOverHttps ? { "upgrade-insecure-requests": [] } : {}),
      },
    },
    // Tile servers commonly require a Referer (their usage policies ask for one); otherwise send none at all.
    referrerPolicy: { policy: tiles.length > 0 ? "strict-origin-when-cross-origin" : "no-referrer" },
    strictTransportSecurity: production ? { maxAge: 365 * 24 * 60 * 60, includeSubDomains: true } : false,
    xFrameOptions: { action: "deny" },
  });
}
