import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { apiAs, openBrowser, repoRoot, screenshot, signIn, startServer, type BrowserSession, type RunningServer } from "./support/browser";

// The layouts monitors write, uploaded through the wizard to the counts documented in data-samples/README.md:
// date and time in two columns, columns aligned with runs of blanks, a delimiter the detection gets wrong, and a
// plain-text preamble above the column names.
let server: RunningServer;
let browser: BrowserSession;
let newCampaign: (name: string) => Promise<number>;

beforeAll(async () => {
  server = await startServer({ seed: "users" });
  const lead = await apiAs(server.url, "lead");
  const post = (path: string, body: unknown) => lead<{ id: number }>(path, { body });
  const site = await post("/sites", { name: "Layout Mesa", latitude: -27.42, longitude: -70.15, elevationM: 2650 });
  // One campaign per file: the sample files share their times, which one campaign would count as duplicates.
  newCampaign = async (name: string) => (await post(`/sites/${site.id}/campaigns`, { name, monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 } })).id;
  browser = await openBrowser({ width: 1366, height: 900 });
  await signIn(browser.page, server.url, "lead");
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const checkSummary = (page: Page) => page.getByTestId("check-summary").textContent();

/** Screenshots of the wizard at desktop and phone width, then the upload and its counts. */
async function uploadAndCount(page: Page, name: string, accepted: number, rejected: number) {
  await screenshot(page, `upload-format-${name}-desktop`);
  await page.setViewportSize({ width: 390, height: 844 });
  await page.waitForTimeout(300);
  // Nothing scrolls the page sideways at phone width.
  expect(await page.evaluate<number>("document.documentElement.scrollWidth - document.documentElement.clientWidth")).toBe(0);
  await screenshot(page, `upload-format-${name}-phone`);
  await page.setViewportSize({ width: 1366, height: 900 });
  await page.getByRole("button", { name: "Upload", exact: true }).click();
  await expect.poll(() => page.getByTestId("accepted-count").textContent(), { timeout: 15_000 }).toBe(`${accepted} accepted`);
  expect(await page.getByTestId("rejected-count").textContent()).toBe(`${rejected} rejected`);
}

describe("the upload wizard with the layouts monitors write", () => {
  it("proposes Date and Time as the two halves of the time and reads format-two-columns.csv: 90 rows, 88 accepted", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${await newCampaign("Two columns")}`);
    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/format-two-columns.csv"));
    await expect.poll(() => page.getByLabel(/Date of the sample/).inputValue()).toBe("Date");
    expect(await page.getByLabel(/Time of the sample/).inputValue()).toBe("Time");
    await expect.poll(() => checkSummary(page), { timeout: 20_000 }).toBe("All 90 rows checked: 88 usable, 2 with a problem. Nothing has been stored yet.");
    // The preview shows the two columns read as one UTC time.
    await expect.poll(() => page.getByRole("table", { name: "First rows as the server reads them" }).getByRole("row").nth(1).textContent()).toContain("2025-06-12 23:00:00");
    await uploadAndCount(page, "two-columns", 88, 2);
    expect(browser.problems).toEqual([]);
  });

  it("detects columns aligned with runs of blanks and reads format-whitespace.txt: 80 rows, 78 accepted", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${await newCampaign("Aligned columns")}`);
    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/format-whitespace.txt"));
    await expect.poll(() => page.getByLabel("Columns separated by").locator("option").first().textContent()).toBe("Detect (found: runs of spaces or tabs)");
    await expect.poll(() => checkSummary(page), { timeout: 20_000 }).toBe("All 80 rows checked: 78 usable, 2 with a problem. Nothing has been stored yet.");
    await uploadAndCount(page, "whitespace", 78, 2);
    expect(browser.problems).toEqual([]);
  });

  it("reads format-delimiter.csv once semicolon is chosen where the detection took the comma: 50 rows, 49 accepted", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${await newCampaign("Tied delimiters")}`);
    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/format-delimiter.csv"));
    // Split at the comma, the header names no needed field.
    await page.getByRole("alert", { name: "Mapping problems" }).waitFor();
    await page.getByLabel("Columns separated by").selectOption(";");
    await expect.poll(() => page.getByLabel(/Time of the sample/).inputValue()).toBe("time_utc");
    await expect.poll(() => checkSummary(page), { timeout: 20_000 }).toBe("All 50 rows checked: 49 usable, 1 with a problem. Nothing has been stored yet.");
    await uploadAndCount(page, "delimiter", 49, 1);
    expect(browser.problems).toEqual([]);
  });

  it("skips the preamble above the line of the column names and reads format-preamble.txt: 5 preamble lines, 60 rows, 59 accepted", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${await newCampaign("Preamble")}`);
    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/format-preamble.txt"));
    await page.getByRole("alert", { name: "Mapping problems" }).waitFor();
    await page.getByLabel(/Column names on line/).fill("6");
    expect(await page.getByTestId("preamble-note").textContent()).toBe("Lines 1–5 stand above the column names: skipped as a preamble, never read as rows.");
    await expect.poll(() => page.getByLabel(/Time of the sample/).inputValue()).toBe("time_utc");
    await expect.poll(() => checkSummary(page), { timeout: 20_000 }).toBe("All 60 rows checked: 59 usable, 1 with a problem. Nothing has been stored yet.");
    await uploadAndCount(page, "preamble", 59, 1);
    expect(await page.getByTestId("result-preamble").textContent()).toBe("Lines 1–5 above the column names on line 6: skipped as a preamble, not rows.");
    expect(browser.problems).toEqual([]);
  });

  it("says what to write for a line number that is not one, and keeps the upload back", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${await newCampaign("Bad line")}`);
    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/format-preamble.txt"));
    await page.getByLabel(/Column names on line/).fill("six");
    await page.getByText("The line of the column names: write a whole line number from 1 (the first line of the file), or leave it empty.").waitFor();
    expect(await page.getByRole("button", { name: "Upload", exact: true }).isDisabled()).toBe(true);
    expect(browser.problems).toEqual([]);
  });

  it("offers the wavelength for a seeing log and scales its preview to 500 nm, and for a variance log only the variance unit", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${await newCampaign("Wavelength")}`);
    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/wizard-fwhm-airmass.csv"));
    const firstSeeing = () => page.getByRole("table", { name: "First rows as the server reads them" }).getByRole("row").nth(1).getByRole("cell").nth(2).textContent();
    // Line 2 of the file: FWHM 0.801″ at airmass 1.333, reduced to zenith by (cos z)^(3/5) = (1/X)^(3/5) (seeing-physics.md).
    const atZenith = 0.801 * (1 / 1.333) ** 0.6;
    await expect.poll(firstSeeing, { timeout: 20_000 }).toBe(`${atZenith.toFixed(2)}″`);
    expect(await page.getByRole("radiogroup", { name: "Variance unit" }).count()).toBe(0);
    await page.getByLabel(/Measurement wavelength of this file/).fill("650");
    // Seeing ∝ λ^(-1/5): measured at 650 nm it is (650/500)^(1/5) times larger at 500 nm.
    await expect.poll(firstSeeing, { timeout: 20_000 }).toBe(`${(atZenith * (650 / 500) ** 0.2).toFixed(2)}″`);
    await screenshot(page, "upload-format-wavelength-desktop");
    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(300);
    expect(await page.evaluate<number>("document.documentElement.scrollWidth - document.documentElement.clientWidth")).toBe(0);
    await screenshot(page, "upload-format-wavelength-phone");
    await page.setViewportSize({ width: 1366, height: 900 });
    await page.getByLabel(/Measurement wavelength of this file/).fill("9");
    await page.getByText("The wavelength: write it in nanometres between 300 and 2500 (e.g. 550), or leave it empty for the campaign's.").waitFor();
    expect(await page.getByRole("button", { name: "Upload", exact: true }).isDisabled()).toBe(true);

    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/native-arcsec2.csv"));
    await page.getByRole("radiogroup", { name: "Variance unit" }).waitFor();
    expect(await page.getByLabel(/Measurement wavelength of this file/).count()).toBe(0);
    await page.getByText(/Not needed: seeing from image-motion variances does not depend on it/).waitFor();
    expect(browser.problems).toEqual([]);
  });
});
