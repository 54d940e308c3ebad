import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openBrowser, screenshot, signIn, startServer, type BrowserSession, type RunningServer } from "./support/browser";

// The Compare page in a real chromium on the full demo scenario: the survey lead sets the four ridges side by
// side, reads the paired verdicts, narrows the window, downloads the table; the engineer sees only their sites.
let server: RunningServer;
let browser: BrowserSession;

const DESKTOP = { width: 1366, height: 900 };
const TABLET = { width: 820, height: 1180 };
const PHONE = { width: 390, height: 844 };
const DEMO_SITES = ["Condor Spur", "Quartz Shoulder", "Saltpan Crest", "Tern Ridge"];

beforeAll(async () => {
  server = await startServer({ seed: "full" });
  browser = await openBrowser(DESKTOP);
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

/** How far the page itself scrolls sideways (0: nothing sticks out; tables scroll in their own box). */
const sidewaysOverflowPx = () =>
  browser.page.evaluate(() => {
    // Typed without the DOM library (the tests' tsconfig has Node types only).
    const root = (globalThis as unknown as { document: { documentElement: { scrollWidth: number; clientWidth: number } } }).document.documentElement;
    return root.scrollWidth - root.clientWidth;
  });

describe("the Compare page in a browser", () => {
  it("lets the survey lead compare the four demo ridges and read the paired verdicts in words", async () => {
    const { page } = browser;
    await signIn(page, server.url, "lead");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Compare" }).click();
    await page.waitForURL(/\/compare$/);
    await expect.poll(() => page.getByText("Choose what to compare.").count()).toBe(1);
    const sites = page.getByRole("group", { name: /^Sites/ });
    for (const name of DEMO_SITES) await sites.getByRole("checkbox", { name: new RegExp(name) }).check();
    await page.getByLabel("Outer scale L0 (m)").fill("30");
    await page.getByRole("button", { name: "Compare" }).click();
    // The choice lives in the address, so the comparison can be bookmarked
    await page.waitForURL(/\/compare\?sites=\d+%2C\d+%2C\d+%2C\d+&outerScaleM=30$/);
    await page.getByRole("heading", { name: "Side by side" }).waitFor({ timeout: 90_000 });

    const table = page.getByRole("region", { name: "Comparison table (scrolls sideways)" });
    expect((await table.getByRole("rowheader").allTextContents()).map((text) => text.trim())).toEqual(
      expect.arrayContaining(DEMO_SITES.map((name) => expect.stringContaining(name))),
    );
    // The best median is marked by a star and bold text (and named for screen readers), not by colour alone
    const best = table.locator("td.font-bold", { hasText: "best (lowest median seeing)" });
    expect(await best.count()).toBe(1);
    expect(await best.textContent()).toMatch(/★best \(lowest median seeing\): \d\.\d\d″/);
    expect(await page.getByText(/L0 = 30 m/).count()).toBeGreaterThan(0);

    const verdicts = await page.getByTestId("paired-verdict").allTextContents();
    expect(verdicts).toHaveLength(6);
    for (const verdict of verdicts) expect(verdict).toMatch(/is sharper than .* by \d\.\d\d″ in median seeing \(95 % interval|No clear difference|No paired verdict|No common nights/);
    // Quartz Shoulder (invented median 0.62″) against Condor Spur (1.08″): a clear verdict with its interval and test
    expect(verdicts.find((verdict) => verdict.startsWith("Quartz Shoulder is sharper than Condor Spur"))).toMatch(/\d+ common nights; Wilcoxon signed-rank on nightly medians p [<=] [\d.]+\)\.$/);
    expect(await page.getByText(/mixes seasons and weather with the site/).count()).toBe(6);
    await page.waitForSelector(".recharts-surface");
    await page.waitForSelector("path.site-marker");
    expect(await page.locator("path.site-marker").count()).toBe(4);
    expect(await page.locator(".leaflet-tooltip", { hasText: /median \d\.\d\d″/ }).count()).toBe(4);

    for (const [name, viewport] of [["desktop", DESKTOP], ["tablet", TABLET]] as const) {
      await page.setViewportSize(viewport);
      await page.waitForTimeout(700);
      expect(await sidewaysOverflowPx()).toBe(0);
      await screenshot(page, `compare-lead-${name}`);
    }
    await page.setViewportSize(PHONE);
    await page.waitForTimeout(700);
    expect(await sidewaysOverflowPx()).toBe(0);
    await table.screenshot({ path: `${process.cwd()}/screenshots/compare-lead-table-phone.png` });
    await page.setViewportSize(DESKTOP);
    expect(browser.problems).toEqual([]);
  });

  it("changes the numbers when the lead narrows the date window, and keeps the window in the address", async () => {
    const { page } = browser;
    const medianCells = async () => (await page.getByRole("region", { name: "Comparison table (scrolls sideways)" }).locator("tbody tr td:nth-of-type(3)").allTextContents()).join(" | ");
    const before = await medianCells();
    const verdictsBefore = await page.getByTestId("paired-verdict").allTextContents();
    await page.getByLabel("From", { exact: true }).fill("2025-06-01");
    await page.getByLabel("To", { exact: true }).fill("2025-08-31");
    await page.getByRole("button", { name: "Apply" }).click();
    await page.waitForURL(/from=2025-06-01&to=2025-08-31/);
    await expect.poll(() => page.getByTestId("comparison-scope").textContent(), { timeout: 90_000 }).toMatch(/^2025-06-01 to 2025-08-31 \(UTC\)/);
    await expect.poll(medianCells, { timeout: 90_000 }).not.toBe(before);
    expect(await page.getByTestId("paired-verdict").allTextContents()).not.toEqual(verdictsBefore);
    await screenshot(page, "compare-lead-winter-window-desktop");
  });

  it("downloads the table as CSV with # lines naming the window, filters and coefficient sets", async () => {
    const { page } = browser;
    const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Download table (CSV)" }).click()]);
    expect(download.suggestedFilename()).toMatch(/^calmcrest-comparison-\d{4}-\d{2}-\d{2}\.csv$/);
    const text = readFileSync((await download.path()) ?? "", "utf8");
    const lines = text.split("\n");
    expect(lines).toContain("# window: 2025-06-01 to 2025-08-31 (UTC)");
    expect(lines.find((line) => line.startsWith("# filters:"))).toMatch(/zenith limit 60 deg; sun limit -18 deg/);
    expect(lines.find((line) => line.startsWith("# coefficient sets:"))).toMatch(/Sarazin & Roddier/);
    expect(lines.find((line) => line.startsWith("# generated "))).toMatch(/^# generated \d{4}-\d{2}-\d{2}T/);
    for (const name of DEMO_SITES) expect(lines.some((line) => line.startsWith(`"${name}",`))).toBe(true);
    // a negative difference is written so a spreadsheet will not read it as a formula
    expect(text).toMatch(/"'-\d\.\d+"/);
  });

  it("shows a field engineer only the sites of their campaigns to compare", async () => {
    const { page } = browser;
    await browser.context.clearCookies();
    await signIn(page, server.url, "engineer");
    await page.goto(`${server.url}/compare`);
    const sites = page.getByRole("group", { name: /^Sites/ });
    await sites.getByRole("checkbox").first().waitFor();
    expect((await sites.getByRole("checkbox").all()).length).toBe(2);
    expect(await sites.textContent()).not.toMatch(/Quartz Shoulder|Condor Spur/);
    expect(browser.problems).toEqual([]);
  });
});
