import request from "supertest";
import { describe, expect, it } from "vitest";
import { createTestServer } from "../test-support";
import { tileSource } from "./security-headers";

const { app } = await createTestServer({ seed: "none" });
const { app: tiledApp } = await createTestServer({ seed: "none", env: { CALMCREST_TILE_URL: "https://{s}.tiles.example.org/{z}/{x}/{y}.png" } });
const { app: productionApp } = await createTestServer({ seed: "none", env: { NODE_ENV: "production", CALMCREST_PUBLIC_URL: "https://calmcrest.example.org" } });

/** The directives of a Content-Security-Policy header, by name. */
function directives(header: string | undefined): Map<string, string[]> {
  const map = new Map<string, string[]>();
  for (const part of (header ?? "").split(";")) {
    const [name, ...values] = part.trim().split(/\s+/);
    if (name) map.set(name, values);
  }
  return map;
}

describe("security headers", () => {
  for (const path of ["/", "/api/health", "/api/no-such-route"]) {
    it(`are on ${path}: nosniff, frame-ancestors 'none', DENY, a Referrer-Policy, no HSTS outside production`, async () => {
      const response = await request(app).get(path);
      expect(response.headers["x-content-type-options"]).toBe("nosniff");
      expect(directives(response.headers["content-security-policy"]).get("frame-ancestors")).toEqual(["'none'"]);
      expect(response.headers["x-frame-options"]).toBe("DENY");
      expect(response.headers["referrer-policy"]).toBe("no-referrer");
      expect(response.headers["strict-transport-security"]).toBeUndefined();
      expect(response.headers["x-powered-by"]).toBeUndefined();
    });
  }

  it("have a content security policy with no inline script, no eval, and only this server's scripts, styles and fonts", async () => {
    const csp = directives((await request(app).get("/")).headers["content-security-policy"]);
    expect(csp.get("default-src")).toEqual(["'self'"]);
    expect(csp.get("script-src")).toEqual(["'self'"]);
    expect(csp.get("script-src-attr")).toEqual(["'none'"]);
    expect(csp.get("style-src")).toEqual(["'self'"]);
    expect(csp.get("font-src")).toEqual(["'self'"]);
    expect(csp.get("connect-src")).toEqual(["'self'"]);
    expect(csp.get("object-src")).toEqual(["'none'"]);
    // Leaflet's marker and layer icons are data: URI images in its CSS; no tile host is allowed when none is configured.
    expect(csp.get("img-src")).toEqual(["'self'", "data:"]);
    // On plain http (the local default) upgrading requests would break the app.
    expect(csp.has("upgrade-insecure-requests")).toBe(false);
  });

  it("allow the configured tile host's images (with {s} as a wildcard label) and send it the origin as Referer", async () => {
    const response = await request(tiledApp).get("/api/health");
    expect(directives(response.headers["content-security-policy"]).get("img-src")).toEqual(["'self'", "data:", "https://*.tiles.example.org"]);
    expect(response.headers["referrer-policy"]).toBe("strict-origin-when-cross-origin");
  });

  it("add HSTS and upgrade-insecure-requests in production over https", async () => {
    const response = await request(productionApp).get("/api/health");
    expect(response.headers["strict-transport-security"]).toBe("max-age=31536000; includeSubDomains");
    expect(directives(response.headers["content-security-policy"]).has("upgrade-insecure-requests")).toBe(true);
  });
});

describe("tileSource", () => {
  it("keeps scheme and host, drops the path, and turns a template label into *", () => {
    expect(tileSource("https://tiles.example.org/{z}/{x}/{y}.png")).toBe("https://tiles.example.org");
    expect(tileSource("https://{s}.tiles.example.org:8443/{z}/{x}/{y}.png?key=1")).toBe("https://*.tiles.example.org:8443");
    expect(() => tileSource("ftp://tiles.example.org/x")).toThrow(/http/);
  });
});
