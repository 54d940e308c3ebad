import { createServer, get as httpGet, type IncomingHttpHeaders, type Server } from "node:http";
import { brotliDecompressSync, gunzipSync } from "node:zlib";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiAs, openBrowser, screenshot, signIn, startServer, type BrowserSession, type RunningServer } from "./support/browser";

// The built app under its content security policy in a real chromium: every screen loads with no CSP violation,
// including map tiles from a configured tile host on another origin (a local stand-in tile server).
let server: RunningServer;
let browser: BrowserSession;
let tiles: Server;
let tileRequests = 0;

// A 1×1 transparent PNG (the smallest valid PNG; common practice for placeholder tiles).
const PNG = Buffer.from("iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mNkYPhfDwAChwGA60e6kgAAAABJRU5ErkJggg==", "base64");

beforeAll(async () => {
  tiles = createServer((_req, res) => {
    tileRequests += 1;
    res.writeHead(200, { "Content-Type": "image/png" }).end(PNG);
  });
  await new Promise<void>((resolve) => tiles.listen(0, "127.0.0.1", resolve));
  const tilePort = (tiles.address() as AddressInfo).port;
  server = await startServer({ seed: "users", env: { CALMCREST_TILE_URL: `http://127.0.0.1:${tilePort}/{z}/{x}/{y}.png`, CALMCREST_TILE_ATTRIBUTION: "Test tiles" } });
  browser = await openBrowser();
  // Every CSP violation the page reports, whether or not chromium also logs it.
  // (Runs in the page; typed by hand because the tests compile without the DOM library.)
  await browser.context.addInitScript(() => {
    type CspEvent = { violatedDirective: string; blockedURI: string };
    const page = globalThis as unknown as { cspViolations: string[]; document: { addEventListener(type: string, listener: (event: CspEvent) => void): void } };
    page.cspViolations = [];
    page.document.addEventListener("securitypolicyviolation", (event) => page.cspViolations.push(`${event.violatedDirective} ${event.blockedURI}`));
  });
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
  await new Promise((resolve) => tiles?.close(resolve));
});

async function violations(): Promise<string[]> {
  return browser.page.evaluate(() => (globalThis as unknown as { cspViolations?: string[] }).cspViolations ?? []);
}

describe("the built app under its content security policy", () => {
  it("is served with a CSP that allows no inline script", async () => {
    const response = await fetch(`${server.url}/sign-in`);
    const csp = response.headers.get("content-security-policy") ?? "";
    expect(csp).toMatch(/script-src 'self'(;|$)/);
    expect(csp).not.toMatch(/unsafe-inline|unsafe-eval/);
    expect(csp).toMatch(/frame-ancestors 'none'/);
    const html = await response.text();
    // The built page has no inline script for the policy to block.
    expect(html).not.toMatch(/<script(?![^>]*\bsrc=)[^>]*>/);
  });

  it("loads sign-in, the map with tiles from the configured host, and a site page with no CSP violation", async () => {
    const { page } = browser;
    const lead = await apiAs(server.url, "lead");
    const site = await lead<{ id: number }>("/sites", { body: { name: "Policy Knoll", latitude: -24.6, longitude: -70.4, elevationM: 2900 } });

    await signIn(page, server.url, "lead");
    await page.goto(`${server.url}/sites`);
    await page.locator(".leaflet-container").first().waitFor();
    await expect.poll(() => tileRequests, { timeout: 15_000 }).toBeGreaterThan(0);
    await expect.poll(() => page.locator("img.leaflet-tile-loaded").count(), { timeout: 15_000 }).toBeGreaterThan(0);
    await screenshot(page, "security-map-with-tiles");
    expect(await violations()).toEqual([]);

    await page.goto(`${server.url}/sites/${site.id}`);
    await page.getByRole("heading", { level: 1 }).waitFor();
    await page.waitForLoadState("networkidle");
    expect(await violations()).toEqual([]);
  });

  it("sends the built scripts compressed (brotli, else gzip, else as they are), kept a year under their hashed names", async () => {
    const html = await (await fetch(`${server.url}/`)).text();
    const script = /<script[^>]+src="(\/assets\/[^"]+\.js)"/.exec(html)?.[1];
    expect(script, "the page's entry script").toBeDefined();
    const raw = (acceptEncoding: string) =>
      new Promise<{ headers: IncomingHttpHeaders; body: Buffer }>((resolve, reject) => {
        httpGet(`${server.url}${script ?? ""}`, { headers: { "accept-encoding": acceptEncoding } }, (response) => {
          const chunks: Buffer[] = [];
          response.on("data", (chunk: Buffer) => chunks.push(chunk));
          response.on("end", () => resolve({ headers: response.headers, body: Buffer.concat(chunks) }));
        }).on("error", reject);
      });
    const plain = await raw("identity");
    const brotli = await raw("gzip, deflate, br, zstd");
    const gzipped = await raw("gzip");
    expect(plain.headers["content-encoding"]).toBeUndefined();
    expect(brotli.headers["content-encoding"]).toBe("br");
    expect(gzipped.headers["content-encoding"]).toBe("gzip");
    for (const answer of [plain, brotli, gzipped]) {
      expect(answer.headers["content-type"]).toMatch(/^text\/javascript|^application\/javascript/);
      expect(answer.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
      expect(answer.headers.vary ?? "").toMatch(/Accept-Encoding/i);
      // Static files carry the same security headers as every answer.
      expect(answer.headers["x-content-type-options"]).toBe("nosniff");
    }
    expect(brotliDecompressSync(brotli.body).equals(plain.body)).toBe(true);
    expect(gunzipSync(gzipped.body).equals(plain.body)).toBe(true);
    expect(brotli.body.byteLength).toBeLessThan(plain.body.byteLength / 2);
  });

  it("saw no page errors or console errors (CSP violations are console errors in chromium)", () => {
    expect(browser.problems).toEqual([]);
  });
});
