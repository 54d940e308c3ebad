import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { openBrowser, repoRoot, screenshot, signIn, startServer, type BrowserSession, type RunningServer, type Role } from "./support/browser";

// Every screen at phone (390 px), tablet (820 px) and desktop (1366 px) width on the demo scenario: the page
// itself never scrolls sideways (wide tables and charts scroll inside their own box). Screenshots of each page at
// each width go to tests/screenshots/width-<page>-<width>.png to be looked at.
let server: RunningServer;
let browser: BrowserSession;
const WIDTHS = [390, 820, 1366] as const;

/** How many pixels the page is wider than the window (0: no sideways scroll). */
async function sidewaysOverflowPx(page: Page): Promise<number> {
  return page.evaluate("document.documentElement.scrollWidth - document.documentElement.clientWidth") as Promise<number>;
}

/** The elements sticking out past the right edge, to name in a failure. */
async function widestElements(page: Page): Promise<string> {
  return page.evaluate(`(() => {
    const limit = document.documentElement.clientWidth;
    const out = [];
    for (const element of document.querySelectorAll("body *")) {
      const box = element.getBoundingClientRect();
      if (box.right > limit + 1 && box.width > 0) out.push(element.tagName.toLowerCase() + (element.className && typeof element.className === "string" ? "." + element.className.split(" ").slice(0, 3).join(".") : "") + " right=" + Math.round(box.right));
      if (out.length >= 6) break;
    }
    return out.join(" | ");
  })()`) as Promise<string>;
}

async function firstLinkHref(page: Page, pattern: RegExp): Promise<string> {
  const hrefs = await page.locator("a[href]").evaluateAll((links) => links.map((link) => link.getAttribute("href") ?? ""));
  const found = hrefs.find((href) => pattern.test(href));
  if (!found) throw new Error(`no link matching ${pattern}`);
  return found;
}

async function measure(page: Page, name: string, path: string, prepare?: (page: Page) => Promise<void>): Promise<Record<number, string>> {
  const seen: Record<number, string> = {};
  for (const width of WIDTHS) {
    await page.setViewportSize({ width, height: width === 390 ? 844 : width === 820 ? 1180 : 900 });
    await page.goto(`${server.url}${path}`);
    await page.waitForLoadState("networkidle");
    if (prepare) await prepare(page);
    await page.waitForTimeout(500);
    const overflow = await sidewaysOverflowPx(page);
    seen[width] = overflow <= 0 ? "ok" : `${overflow} px too wide: ${await widestElements(page)}`;
    await screenshot(page, `width-${name}-${width}`);
  }
  return seen;
}

const allOk = Object.fromEntries(WIDTHS.map((width) => [width, "ok"]));

beforeAll(async () => {
  server = await startServer({ seed: "full" });
  browser = await openBrowser({ width: 1366, height: 900 });
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

async function as(role: Role | null) {
  await browser.context.clearCookies();
  if (role) await signIn(browser.page, server.url, role);
}

describe("no sideways page scroll at 390, 820 and 1366 px", () => {
  it("on the sign-in page", async () => {
    await as(null);
    expect(await measure(browser.page, "sign-in", "/sign-in")).toEqual(allOk);
  });

  it("on the survey lead's screens", async () => {
    await as("lead");
    const { page } = browser;
    await page.goto(`${server.url}/sites`);
    await page.waitForLoadState("networkidle");
    const site = await firstLinkHref(page, /^\/sites\/\d+$/);
    await page.goto(`${server.url}${site}`);
    await page.waitForLoadState("networkidle");
    const campaign = await firstLinkHref(page, /^\/campaigns\/\d+$/);
    const results: Record<string, Record<number, string>> = {};
    results.sites = await measure(page, "sites", "/sites");
    results.site = await measure(page, "site", site);
    results.campaign = await measure(page, "campaign", campaign);
    results.upload = await measure(page, "upload", `/upload?campaign=${campaign.split("/").pop() ?? ""}`, async (current) => {
      await current.locator('input[type="file"]').setInputFiles(join(repoRoot, "data-samples/wizard-fwhm-airmass.csv"));
      await current.getByTestId("check-summary").waitFor({ timeout: 20_000 });
    });
    results.compare = await measure(page, "compare", "/compare");
    results.reports = await measure(page, "reports", "/reports");
    results.account = await measure(page, "account", "/account");
    expect(results).toEqual(Object.fromEntries(Object.keys(results).map((key) => [key, allOk])));
  }, 240_000);

  it("on the administrator's screens", async () => {
    await as("admin");
    const { page } = browser;
    await page.goto(`${server.url}/admin/people`);
    await page.waitForLoadState("networkidle");
    const person = await firstLinkHref(page, /^\/admin\/people\/[^/]+$/).catch(() => null);
    const results: Record<string, Record<number, string>> = {};
    results.people = await measure(page, "people", "/admin/people");
    if (person) results.person = await measure(page, "person", person);
    results.outbox = await measure(page, "outbox", "/admin/outbox");
    results.audit = await measure(page, "audit", "/admin/audit");
    expect(results).toEqual(Object.fromEntries(Object.keys(results).map((key) => [key, allOk])));
  }, 240_000);

  it("on the committee's screens", async () => {
    await as("committee");
    expect(await measure(browser.page, "committee-reports", "/reports")).toEqual(allOk);
  });
});
