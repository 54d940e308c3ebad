import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiAs, openBrowser, repoRoot, screenshot, signIn, startServer, type BrowserSession, type RunningServer } from "./support/browser";

// The upload wizard's whole-file check in a real chromium: late bad rows found before the upload, the
// confirmation a file with no usable row needs, the comment block's monitor settings, removing a file of a batch,
// and the result that explains the later filters, focused and announced.
let server: RunningServer;
let browser: BrowserSession;
let campaignId = 0;
const scratch = mkdtempSync(join(tmpdir(), "calmcrest-check-"));
const FWHM_LOG = join(repoRoot, "data-samples/wizard-fwhm-airmass.csv");
const PX2_LOG = join(repoRoot, "data-samples/native-px2.tsv");

beforeAll(async () => {
  server = await startServer({ seed: "users" });
  const lead = await apiAs(server.url, "lead");
  const post = (path: string, body: unknown) => lead<{ id: number }>(path, { body });
  const site = await post("/sites", { name: "Check Knoll", latitude: -27.42, longitude: -70.15, elevationM: 2650 });
  campaignId = (await post(`/sites/${site.id}/campaigns`, { name: "Check monitor", monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 } })).id;
  browser = await openBrowser({ width: 1366, height: 900 });
  await signIn(browser.page, server.url, "lead");
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await server?.stop();
  rmSync(scratch, { recursive: true, force: true });
});

describe("the upload wizard's whole-file check", () => {
  it("finds the bad rows on lines 52 and 103 before the upload, and the result says what the zenith and sun limits will set aside", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${campaignId}`);
    await page.locator("input[type=file]").setInputFiles(FWHM_LOG);
    const summary = page.getByTestId("check-summary");
    await summary.waitFor({ timeout: 15_000 });
    // data-samples/README.md: 400 rows; airmass 0.800 on line 52, empty FWHM on line 103; airmass 2.5 on line 154.
    expect(await summary.textContent()).toBe("All 400 rows checked: 398 usable, 2 with a problem. Nothing has been stored yet.");
    const check = page.getByTestId("whole-file-check");
    expect(await check.getByText(/^Line 52:/).count()).toBe(1);
    expect(await check.getByText(/^Line 103:/).count()).toBe(1);
    expect(await check.getByText("2025-05-02 02:10:00;1.064;0.800;8.2").count()).toBe(1);
    expect(await page.getByTestId("check-set-aside").textContent()).toMatch(
      // 121 rows of the 3 nights were taken with the sun above −18° at the campaign's site (the campaign page's summary says the same).
      /^Of these, 1 will be set aside by the standard zenith limit \(60°\) and 121 by the standard sun limit \(sun above -18°\) in the statistics/,
    );
    expect(await page.getByTestId("raw-lines").textContent()).toMatch(/^Timestamp \(UTC\);FWHM \[arcsec\];Airmass;Wind \[m\/s\]/);
    await screenshot(page, "upload-check-desktop");
    await page.getByRole("button", { name: "Upload", exact: true }).click();
    await expect.poll(() => page.getByTestId("accepted-count").textContent(), { timeout: 15_000 }).toBe("398 accepted");
    expect(await page.getByTestId("result-set-aside").textContent()).toMatch(/^Of the 398 accepted, 1 will be set aside by the standard zenith limit \(60°\) and 121 by the standard sun limit/);
    // Focus went to the result, and a screen reader hears how it went.
    expect(await page.evaluate("document.activeElement && document.activeElement.id")).toBe("results-heading");
    await expect.poll(() => page.getByTestId("upload-announcement").textContent()).toBe("Upload finished: 1 of 1 file stored and read. The counts are below.");
    await screenshot(page, "upload-check-result-desktop");
    expect(browser.problems).toEqual([]);
  });

  it("asks for an explicit 'store it anyway' before a file whose rows are all unusable, and lets one file of a batch be removed", async () => {
    const { page } = browser;
    const julian = join(scratch, "julian-dates.csv");
    const rows = ["time_utc,seeing_arcsec,zenith_deg", ...Array.from({ length: 60 }, (_, index) => `${(2460000.5 + index / 1440).toFixed(5)},0.8,20`)];
    writeFileSync(julian, `${rows.join("\n")}\n`);
    const good = join(scratch, "good.csv");
    writeFileSync(good, "time_utc,seeing_arcsec,zenith_deg\n2025-06-01T03:00:00Z,0.8,20\n");
    await page.goto(`${server.url}/upload?campaign=${campaignId}`);
    await page.locator("input[type=file]").setInputFiles([julian, good]);
    await page.getByRole("button", { name: "Remove good.csv from this batch" }).click();
    await expect.poll(() => page.getByRole("button", { name: /^Remove / }).count()).toBe(1);
    await page.getByText(/No row of this file can be used/).waitFor({ timeout: 15_000 });
    expect(await page.getByTestId("check-summary").textContent()).toBe("All 60 rows checked: 0 usable, 60 with a problem. Nothing has been stored yet.");
    const upload = page.getByRole("button", { name: "Upload", exact: true });
    expect(await upload.isDisabled()).toBe(true);
    await page.getByLabel(/Store it anyway/).check();
    expect(await upload.isDisabled()).toBe(false);
    await page.setViewportSize({ width: 390, height: 844 });
    await page.waitForTimeout(300);
    await screenshot(page, "upload-check-confirm-phone");
    await page.setViewportSize({ width: 1366, height: 900 });
    // The wizard sends the confirmation with the file (storeAnyway), and the server keeps it and says so.
    await upload.click();
    const note = page.getByTestId("stored-anyway");
    await note.waitFor({ timeout: 15_000 });
    expect(await note.textContent()).toMatch(/^Stored as asked \("store it anyway"\), although no row of julian-dates.csv can be used/);
    await page.getByTestId("accepted-count").waitFor({ timeout: 15_000 });
    expect(await page.getByTestId("accepted-count").textContent()).toBe("0 accepted");
    expect(browser.problems).toEqual([]);
  });

  it("warns when the file's comment lines state other monitor settings than the campaign's", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${campaignId}`);
    await page.locator("input[type=file]").setInputFiles(PX2_LOG);
    const warning = page.getByTestId("comment-monitor-warning");
    await warning.waitFor();
    expect(await warning.textContent()).toContain("subaperture 50 mm (campaign: 60 mm); baseline 180 mm (campaign: 200 mm); wavelength 550 nm (campaign: 500 nm); pixel scale 0.65″/px (campaign: none)");
    expect(browser.problems).toEqual([]);
  });

  it("reads day-first local times with the time format and zone chosen in the wizard, to the documented counts", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/upload?campaign=${campaignId}`);
    await page.locator("input[type=file]").setInputFiles(join(repoRoot, "data-samples/time-dmy-local.csv"));
    await page.getByLabel(/Time of the sample/).selectOption("Date/time (local)");
    await page.getByLabel(/Seeing FWHM/).selectOption("Seeing");
    await page.getByLabel(/Zenith angle of the star/).selectOption("Zenith");
    await page.getByLabel("Time column holds").selectOption("dmy");
    await page.getByLabel(/Time zone of times written without one/).fill("+02:00");
    // data-samples/README.md: 100 rows, 31 June on line 31 unreadable; 11/06/2025 01:00 at UTC+02:00 is 23:00 UTC.
    await expect.poll(() => page.getByTestId("check-summary").textContent(), { timeout: 20_000 }).toBe("All 100 rows checked: 99 usable, 1 with a problem. Nothing has been stored yet.");
    expect(await page.getByTestId("whole-file-check").getByText(/^Line 31:/).count()).toBe(1);
    await expect.poll(() => page.getByRole("table", { name: "First rows as the server reads them" }).getByRole("row").nth(1).textContent()).toContain("2025-06-10 23:00:00");
    await page.getByRole("button", { name: "Upload", exact: true }).click();
    await expect.poll(() => page.getByTestId("accepted-count").textContent(), { timeout: 15_000 }).toBe("99 accepted");
    await screenshot(page, "upload-check-time-format-desktop");
    expect(browser.problems).toEqual([]);
  });
});
