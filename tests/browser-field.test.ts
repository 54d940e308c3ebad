import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Locator, Page } from "playwright-core";
import { apiAs, openBrowser, repoRoot, screenshot, signIn, startServer, type BrowserSession, type RunningServer, type Role } from "./support/browser";

// The field and analysis screens in a real chromium on the demo scenario: the engineer's upload wizard on a
// non-native log, the survey lead's map → site → date window, and the committee kept out.
let server: RunningServer;
let browser: BrowserSession;

const DESKTOP = { width: 1366, height: 900 };
const TABLET = { width: 820, height: 1180 };
const DEMO_SITES = ["Tern Ridge", "Saltpan Crest", "Quartz Shoulder", "Condor Spur"];

/** Signs in from a clean cookie jar, so a failed earlier test cannot leave someone else signed in. */
async function signInAs(role: Role) {
  await browser.context.clearCookies();
  await signIn(browser.page, server.url, role);
}

async function signOut(page: Page) {
  await page.getByRole("button", { name: "Sign out" }).click();
  await page.waitForURL(/\/sign-in/);
}

/** Screenshots of the current page at desktop and tablet width (back to desktop afterwards). */
async function shots(page: Page, name: string) {
  await page.setViewportSize(DESKTOP);
  await page.waitForTimeout(400);
  await screenshot(page, `${name}-desktop`);
  await page.setViewportSize(TABLET);
  await page.waitForTimeout(600);
  await screenshot(page, `${name}-tablet`);
  await page.setViewportSize(DESKTOP);
}

/** Screenshots of one part of the page at desktop and tablet width, for parts too small to judge in a full-page shot. */
async function partShots(page: Page, part: Locator, name: string) {
  for (const [width, viewport] of [["desktop", DESKTOP], ["tablet", TABLET]] as const) {
    await page.setViewportSize(viewport);
    await page.waitForTimeout(400);
    await part.screenshot({ path: join(repoRoot, `tests/screenshots/${name}-${width}.png`) });
  }
  await page.setViewportSize(DESKTOP);
}

beforeAll(async () => {
  server = await startServer({ seed: "full" });
  browser = await openBrowser(DESKTOP);
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

describe("field and analysis screens in a browser", () => {
  it("shows the survey lead every demo site on the map and in the table, and opens a site from its marker", async () => {
    const { page } = browser;
    await signInAs("lead");
    await page.goto(`${server.url}/sites`);
    await page.waitForSelector("path.site-marker");
    expect(await page.locator("path.site-marker").count()).toBe(DEMO_SITES.length);
    const tableNames = await page.getByRole("table").getByRole("link").allTextContents();
    expect([...tableNames].sort()).toEqual([...DEMO_SITES].sort());
    // The map has no tiles: the shipped country outlines (176 without Antarctica) are drawn as SVG paths.
    expect(await page.locator(".leaflet-tile").count()).toBe(0);
    expect(await page.locator(".leaflet-overlay-pane path:not(.site-marker)").count()).toBe(176);
    await page.locator("path.site-marker").first().hover();
    await expect.poll(() => page.locator(".leaflet-tooltip").last().textContent()).toMatch(/m above sea level/);
    await shots(page, "field-sites-lead");

    // Keyboard: from the map, Tab walks the markers; each is a link named with its figures, focus shows the same
    // tooltip as hover and a ring in the focus colour, and Enter opens the site.
    await page.mouse.move(0, 0);
    await page.locator(".leaflet-container").focus();
    const focusedMarker = page.locator("path.site-marker:focus");
    let focusedName = "";
    for (let presses = 0; presses <= DEMO_SITES.length && !focusedName.startsWith("Tern Ridge"); presses += 1) {
      await page.keyboard.press("Tab");
      focusedName = (await focusedMarker.count()) === 1 ? ((await focusedMarker.getAttribute("aria-label")) ?? "") : "";
    }
    expect(focusedName).toMatch(/^Tern Ridge, median \d\.\d\d″, [\d,]+ nights$/);
    expect(await page.getByRole("link", { name: focusedName }).count()).toBe(1);
    await expect.poll(() => page.locator(".leaflet-tooltip", { hasText: "Tern Ridge" }).count()).toBe(1);
    expect(await page.locator(".leaflet-tooltip", { hasText: "Tern Ridge" }).textContent()).toMatch(/m above sea level/);
    // The focus ring: the marker's stroke turns to the focus colour #e0a526 (apps/web/src/styles.css).
    expect(await focusedMarker.evaluate((element) => element.ownerDocument.defaultView?.getComputedStyle(element).stroke)).toBe("rgb(224, 165, 38)");
    await shots(page, "field-sites-lead-marker-focus");
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/sites\/\d+$/);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Tern Ridge");
    await page.goBack();
    await page.waitForSelector("path.site-marker");

    // Open Tern Ridge by its marker: find the marker whose tooltip names it.
    const markers = page.locator("path.site-marker");
    for (let index = 0; index < (await markers.count()); index += 1) {
      await markers.nth(index).hover();
      if (/Tern Ridge/.test((await page.locator(".leaflet-tooltip").last().textContent()) ?? "")) {
        await markers.nth(index).click();
        break;
      }
    }
    await page.waitForURL(/\/sites\/\d+$/);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Tern Ridge");
  });

  it("changes every figure when the survey lead narrows the date window, and keeps the window in the address", async () => {
    const { page } = browser;
    const accounting = page.getByTestId("sample-accounting");
    await expect.poll(() => accounting.textContent(), { timeout: 30_000 }).toMatch(/samples used/);
    const figures = page.getByTestId("headline-figures");
    const before = { figures: await figures.textContent(), accounting: await accounting.textContent() };
    await page.waitForSelector(".recharts-surface");
    await shots(page, "field-site-lead");

    await page.getByLabel("From", { exact: true }).fill("2025-06-01");
    await page.getByLabel("To", { exact: true }).fill("2025-07-31");
    await page.getByRole("button", { name: "Apply" }).click();
    await page.waitForURL(/from=2025-06-01&to=2025-07-31/);
    await expect.poll(() => accounting.textContent(), { timeout: 30_000 }).not.toBe(before.accounting);
    await expect.poll(() => figures.textContent()).not.toBe(before.figures);
    // The monthly chart now covers June and July only.
    await expect.poll(() => page.locator(".recharts-cartesian-axis-tick-value").allTextContents()).toContain("2025-06");
    const afterTicks = await page.locator(".recharts-cartesian-axis-tick-value").allTextContents();
    expect(afterTicks).not.toContain("2025-03");

    // The view is linkable: reloading the address shows the same window.
    await page.reload();
    expect(await page.getByLabel("From", { exact: true }).inputValue()).toBe("2025-06-01");
    await expect.poll(() => figures.textContent(), { timeout: 30_000 }).not.toBe(before.figures);
    await shots(page, "field-site-lead-window");

    // The survey lead may edit the site, but a demo site has uploads, so moving it is refused in the server's words;
    // the same goes for the monitor of one of its campaigns. Nothing is changed either time.
    await page.getByText("Edit this site").click();
    await page.getByLabel(/Latitude/).fill("-24.1");
    await page.getByRole("button", { name: "Save site" }).click();
    await expect.poll(() => page.getByRole("alert").textContent()).toMatch(/^This site already has uploads.*Create a new site for the corrected position instead\.$/);
    await partShots(page, page.locator("details", { hasText: "Edit this site" }), "field-site-lead-edit");
    const campaignLink = page.getByRole("region", { name: "Campaigns at this site" }).getByRole("heading", { level: 3 }).getByRole("link").first();
    await campaignLink.click();
    await page.waitForURL(/\/campaigns\/\d+$/);
    await page.getByText("Edit this campaign").click();
    // The monitor of a campaign with uploads is locked, and the form says so before any Save.
    await expect.poll(() => page.getByTestId("monitor-locked").textContent()).toMatch(/^Locked: this campaign has uploads/);
    expect(await page.getByLabel(/Height above ground/).count()).toBe(0);
    await partShots(page, page.locator("details", { hasText: "Edit this campaign" }), "field-campaign-lead-edit");
    await signOut(page);
  });

  it("takes the field engineer through the wizard on a semicolon log with foreign headers, to the exact counts", async () => {
    // Setup through the API: a fresh campaign (so no demo sample shares a timestamp) with the engineer as member.
    // The site sits where data-samples/README.md says the sample logs were generated, so the night filter fits.
    const lead = await apiAs(server.url, "lead");
    const site = await lead<{ id: number }>("/sites", { body: { name: "Lichen Saddle", latitude: -27.42, longitude: -70.15, elevationM: 2650 } });
    const campaign = await lead<{ id: number }>(`/sites/${site.id}/campaigns`, { body: { name: "Wizard trial", monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 } } });
    const admin = await apiAs(server.url, "admin");
    const users = await admin<{ id: string; email: string }[]>("/users");
    const engineer = users.find((user) => user.email === "engineer@calmcrest.test");
    expect(engineer).toBeDefined();
    await admin(`/campaigns/${campaign.id}/members`, { body: { userId: engineer?.id } });

    const { page } = browser;
    await signInAs("engineer");
    await page.goto(`${server.url}/upload`);
    await page.getByLabel("Campaign the logs belong to").selectOption({ label: "Lichen Saddle — Wizard trial" });
    await shots(page, "field-upload-engineer-start");
    await page.locator('input[type="file"]').setInputFiles(join(repoRoot, "data-samples/wizard-fwhm-airmass.csv"));

    // The browser proposes the mapping from the foreign headers.
    await expect.poll(() => page.getByLabel(/Time of the sample/).inputValue()).toBe("Timestamp (UTC)");
    expect(await page.getByLabel(/Seeing FWHM/).inputValue()).toBe("FWHM [arcsec]");
    expect(await page.getByLabel(/Airmass of the star/).inputValue()).toBe("Airmass");
    expect(await page.getByLabel(/Wind speed/).inputValue()).toBe("Wind [m/s]");
    // Take the wind column away and put it back by hand, as a person correcting the proposal would.
    await page.getByLabel(/Wind speed/).selectOption("");
    await page.getByLabel(/Wind speed/).selectOption("Wind [m/s]");
    await expect.poll(() => page.getByTestId("preview-summary").textContent(), { timeout: 20_000 }).toMatch(/first 20 rows: 20 usable, 0 with a problem/);
    await shots(page, "field-upload-engineer-mapped");

    await page.getByRole("button", { name: "Upload" }).click();
    // Ingest-time counts: line 52 (airmass 0.8) is impossible and line 103 has no FWHM; line 154 (66.4° from
    // zenith) is stored and only set aside by the zenith filter in summaries (data-samples/README.md).
    await expect.poll(() => page.getByTestId("accepted-count").textContent(), { timeout: 60_000 }).toBe("398 accepted");
    expect(await page.getByTestId("rejected-count").textContent()).toBe("2 rejected");
    const reasons = await page.getByRole("list", { name: "Rejected by reason" }).textContent();
    expect(reasons).toContain("1 impossible value");
    expect(reasons).toContain("1 missing value");
    expect(await page.getByRole("link", { name: /Download the rejected rows/ }).getAttribute("href")).toMatch(/\/api\/uploads\/\d+\/rejected\.csv$/);
    await shots(page, "field-upload-engineer-done");

    await page.getByRole("link", { name: /Open the campaign/ }).click();
    await page.waitForURL(new RegExp(`/campaigns/${campaign.id}$`));
    await expect.poll(() => page.getByTestId("sample-accounting").textContent(), { timeout: 30_000 }).toMatch(/ of 400 samples used/);
    // The README's counts are without a sun filter (no site given to the analyzer); with the sun limit lifted to
    // 90° through the address, the campaign uses exactly its 397 of 400 rows.
    await page.goto(`${server.url}/campaigns/${campaign.id}?sunMaxDeg=90`);
    await expect.poll(() => page.getByTestId("sample-accounting").textContent(), { timeout: 30_000 }).toMatch(/^397 of 400 samples used/);
    const accounting = (await page.getByTestId("sample-accounting").textContent()) ?? "";
    expect(accounting).toContain("1 beyond zenith limit");
    await page.waitForSelector(".recharts-surface");
    await shots(page, "field-campaign-engineer");

    // An exclusion window takes its samples out of every figure, and removing it brings them back.
    // 00:30 ≤ t < 01:00 at the file's 2-minute cadence holds 15 accepted rows (lines 2–16).
    await page.getByLabel("From (UTC)").fill("2025-05-02T00:30");
    await page.getByLabel("To (UTC)").fill("2025-05-02T01:00");
    await page.getByLabel("Reason").fill("Monitor refocused after the trip");
    await page.getByRole("button", { name: "Exclude window" }).click();
    await expect.poll(() => page.getByTestId("sample-accounting").textContent(), { timeout: 30_000 }).toMatch(/^382 of 400 samples used.*15 in an excluded window/);
    await page.getByRole("region", { name: "Excluded time windows" }).screenshot({ path: join(repoRoot, "tests/screenshots/field-exclusions-engineer.png") });
    await page.getByRole("button", { name: "Remove" }).click();
    await expect.poll(() => page.getByTestId("sample-accounting").textContent(), { timeout: 30_000 }).toMatch(/^397 of 400 samples used/);

    // The saved mapping makes the next upload one click: the wizard fills it in by itself.
    await page.goto(`${server.url}/upload?campaign=${campaign.id}`);
    await page.locator('input[type="file"]').setInputFiles(join(repoRoot, "data-samples/wizard-fwhm-airmass.csv"));
    await expect.poll(() => page.getByText(/mapping saved for this campaign fits/).count()).toBe(1);
    // The same bytes again are recognised, never counted twice.
    await page.getByRole("button", { name: "Upload" }).click();
    await expect.poll(() => page.getByText(/uploaded to this campaign already/).count(), { timeout: 30_000 }).toBe(1);

    // Cancel during the transfer: a long log (the sample's rows repeated to about 8 MB, more than any socket buffer)
    // sent at a throttled 200 kB/s is still on its way when Cancel is pressed.
    const sampleLog = readFileSync(join(repoRoot, "data-samples/wizard-fwhm-airmass.csv"), "utf8");
    const [headerLine = "", ...dataLines] = sampleLog.trimEnd().split("\n");
    const longLogDir = mkdtempSync(join(tmpdir(), "calmcrest-long-log-"));
    const longLog = join(longLogDir, "long-trip.csv");
    writeFileSync(longLog, `${headerLine}\n${Array.from({ length: 600 }, () => dataLines.join("\n")).join("\n")}\n`);
    await page.goto(`${server.url}/upload?campaign=${campaign.id}`);
    await page.locator('input[type="file"]').setInputFiles(longLog);
    await expect.poll(() => page.getByText(/mapping saved for this campaign fits/).count()).toBe(1);
    // Its rows repeat the stored file's times: the whole-file check finds no usable row, so storing it takes an explicit yes.
    await page.getByLabel(/Store it anyway/).check({ timeout: 30_000 });
    const network = await browser.context.newCDPSession(page);
    await network.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: 200_000 });
    await page.getByRole("button", { name: "Upload" }).click();
    const cancel = page.getByRole("button", { name: "Cancel sending long-trip.csv" });
    await cancel.waitFor();
    await partShots(page, page.getByRole("region", { name: "Upload" }), "field-upload-engineer-sending");
    await cancel.click();
    await expect.poll(() => page.getByText("Cancelled during the transfer: the file was not stored.", { exact: false }).count()).toBe(1);
    await network.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await network.detach();
    rmSync(longLogDir, { recursive: true, force: true });
    await partShots(page, page.getByRole("region", { name: "Upload" }), "field-upload-engineer-cancelled");
    // The server kept nothing: the campaign still has its one upload.
    const after = await lead<{ uploads: unknown[] }>(`/campaigns/${campaign.id}`);
    expect(after.uploads).toHaveLength(1);
    await signOut(page);
  });

  it("keeps committee members out of every field screen", async () => {
    const { page } = browser;
    await signInAs("committee");
    for (const path of ["/sites", "/sites/1", "/campaigns/1", "/upload"]) {
      await page.goto(`${server.url}${path}`);
      await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toMatch(/not part of your role/);
    }
    expect(await page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents()).toEqual(["Reports"]);
    await signOut(page);
  });

  it("saw no page errors or console errors other than the expected 409s of the refused site move and the repeated upload", () => {
    // Chromium logs every non-2xx answer; moving the site and the duplicate upload above are answered 409 on purpose.
    const conflict = "console: Failed to load resource: the server responded with a status of 409 (Conflict)";
    expect(browser.problems).toEqual([conflict, conflict]);
  });
});
