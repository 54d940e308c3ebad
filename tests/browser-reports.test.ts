import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { PDFParse } from "pdf-parse";
import { openBrowser, screenshot, signIn, startServer, type BrowserSession, type RunningServer } from "./support/browser";

// The report loop in a real chromium on the full demo scenario: the lead writes a report from a comparison and
// publishes it; a committee member reads it and comments on a section; the lead resolves the thread; the outbox
// holds the messages; an upload after publishing leaves the numbers alone and raises the newer-data banner;
// version 2 says what changed; a draft is a 404 for the committee; a hostile section runs no script; the report
// prints to a PDF with its title and table.
let server: RunningServer;
let browser: BrowserSession;
const DESKTOP = { width: 1366, height: 900 };
const PHONE = { width: 390, height: 844 };
const TITLE = "Quartz Shoulder against Condor Spur";
let reportId = 0;

beforeAll(async () => {
  server = await startServer({ seed: "full" });
  browser = await openBrowser(DESKTOP);
  // Every CSP violation a page reports (typed by hand: the tests compile without the DOM library).
  await browser.context.addInitScript(() => {
    type CspEvent = { violatedDirective: string; blockedURI: string };
    const page = globalThis as unknown as { cspViolations: string[]; document: { addEventListener(type: string, listener: (event: CspEvent) => void): void } };
    page.cspViolations = [];
    page.document.addEventListener("securitypolicyviolation", (event) => page.cspViolations.push(`${event.violatedDirective} ${event.blockedURI}`));
  });
});

const cspViolations = () => browser.page.evaluate(() => (globalThis as unknown as { cspViolations?: string[] }).cspViolations ?? []);

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

/** How far the page itself scrolls sideways (0: nothing sticks out). Typed without the DOM library, as the other browser tests. */
const sidewaysOverflowPx = (page: Page) =>
  page.evaluate(() => {
    const root = (globalThis as unknown as { document: { documentElement: { scrollWidth: number; clientWidth: number } } }).document.documentElement;
    return root.scrollWidth - root.clientWidth;
  });

async function switchTo(role: "lead" | "committee" | "admin") {
  await browser.context.clearCookies();
  await signIn(browser.page, server.url, role);
}

/** An API call from the signed-in page (cookies shared; state changes carry this server's Origin). */
async function apiCall(method: "GET" | "POST", path: string, body?: unknown) {
  const response = await browser.page.request.fetch(`${server.url}/api${path}`, { method, headers: { Origin: server.url }, ...(body === undefined ? {} : { data: body }) });
  return { status: response.status(), body: (await response.json()) as Record<string, unknown> };
}

/** The frozen table's cells, row by row, as text. */
const tableText = (page: Page) => page.locator(".comparison-table tbody").innerText();

const HOSTILE = [
  "Quartz Shoulder is **sharper** on common nights.",
  "",
  "<script>window.__pwned = 'script'</script>",
  "",
  "<img src=x onerror=\"window.__pwned = 'img'\">",
  "",
  "[innocent link](javascript:window.__pwned='link') and [another](JAVASCRIPT:window.__pwned='upper')",
].join("\n");

describe("committee reports in a browser", () => {
  it("lets the lead create a report from a comparison, write a hostile-looking section and publish version 1", async () => {
    const { page } = browser;
    await signIn(page, server.url, "lead");
    await page.getByRole("navigation", { name: "Main" }).getByRole("link", { name: "Reports" }).click();
    await page.getByRole("button", { name: "New report" }).click();
    await page.getByLabel("Title").fill(TITLE);
    await page.getByRole("checkbox", { name: "Quartz Shoulder" }).check();
    await page.getByRole("checkbox", { name: "Condor Spur" }).check();
    await page.getByRole("button", { name: "Create the draft" }).click();
    await page.waitForURL(/\/reports\/\d+\?edit=1$/);
    reportId = Number(/\/reports\/(\d+)/.exec(page.url())?.[1]);

    const results = page.locator("li").filter({ has: page.getByLabel("Section 2 title") });
    expect(await results.getByLabel("Section 2 title").inputValue()).toBe("Results");
    await results.getByLabel("Text (Markdown)").fill(HOSTILE);
    await results.getByRole("button", { name: "Save section" }).click();
    await results.getByText("Saved").waitFor();
    await page.getByRole("button", { name: "Publish version 1" }).click();
    await page.getByRole("heading", { level: 1, name: TITLE }).waitFor({ timeout: 90_000 });
    await page.getByText(/^Version 1, published \d{4}-\d{2}-\d{2} by Tomas Reyvik, computed from \d+ uploads\.$/).waitFor();
    expect(browser.problems).toEqual([]);
  });

  it("renders the hostile section as text: no script ran, no script element, no event attribute, no script link", async () => {
    const { page } = browser;
    const section = page.locator(".report-section", { has: page.getByRole("heading", { name: /^Results/ }) });
    await section.locator(".markdown strong", { hasText: "sharper" }).waitFor();
    expect(await page.evaluate(() => (globalThis as unknown as { __pwned?: string }).__pwned)).toBeUndefined();
    expect(await section.locator(".markdown script, .markdown img, .markdown [onerror]").count()).toBe(0);
    expect(await section.locator(".markdown a").count()).toBe(0);
    expect(await section.locator(".markdown").innerText()).toContain("<script>window.__pwned = 'script'</script>");
    // Nothing even tried to run and was blocked: the renderer, not only the CSP, kept it inert.
    expect(await cspViolations()).toEqual([]);
    expect(browser.problems).toEqual([]);
  });

  it("keeps a draft from the committee (404) while the published report is theirs to read and comment on", async () => {
    const { page } = browser;
    const draft = await apiCall("POST", "/reports", { title: "Unfinished draft", comparison: { sites: "1,2" } });
    expect(draft.status).toBe(201);
    await switchTo("committee");
    expect((await apiCall("GET", `/reports/${String(draft.body.id)}`)).status).toBe(404);
    await page.goto(`${server.url}/reports/${String(draft.body.id)}`);
    await page.getByText("Not found, or not shared with you.").waitFor();
    // The one console line that page causes is the API's 404 for the draft, which is the point; nothing else.
    expect(browser.problems).toEqual(["console: Failed to load resource: the server responded with a status of 404 (Not Found)"]);
    browser.problems.splice(0);
    await page.goto(`${server.url}/reports`);
    await page.getByRole("link", { name: TITLE }).waitFor();
    expect(await page.getByRole("link", { name: "Unfinished draft" }).count()).toBe(0);

    await page.getByRole("link", { name: TITLE }).click();
    await page.getByRole("button", { name: "Comment on “Results”" }).click();
    await page.getByLabel("Comment on “Results” (version 1)").fill("Does the margin hold in *winter* too?");
    await page.getByRole("button", { name: "Send comment" }).click();
    const thread = page.locator(".thread", { hasText: "Does the margin hold in" });
    await thread.waitFor();
    expect(await thread.locator("em", { hasText: "winter" }).count()).toBe(1);
    expect(await thread.getByText("Open", { exact: true }).count()).toBe(1);
    expect(browser.problems).toEqual([]);
  });

  it("lets the lead see the comment and resolve the thread", async () => {
    const { page } = browser;
    await switchTo("lead");
    await page.goto(`${server.url}/reports/${reportId}`);
    const thread = page.locator(".thread", { hasText: "Does the margin hold in" });
    await thread.getByRole("button", { name: "Mark resolved" }).click();
    await thread.getByText("Resolved by Tomas Reyvik").waitFor();
    await page.getByText(/^Resolved \(\d+\)$/).click();
    expect(await page.locator(".thread", { hasText: "Does the margin hold in" }).count()).toBe(1);
    await page.getByText(/^Open \(\d+\)$/).click();
    expect(await page.locator(".thread", { hasText: "Does the margin hold in" }).count()).toBe(0);
    expect(browser.problems).toEqual([]);
  });

  it("shows the admin the outbox with the publication, the comment and the resolution", async () => {
    const { page } = browser;
    await switchTo("admin");
    await page.goto(`${server.url}/admin/outbox`);
    const subjects = async () => (await page.locator("summary").allInnerTexts()).join("\n");
    await expect.poll(subjects).toContain(`Report published: ${TITLE} (version 1)`);
    const all = await subjects();
    expect(all).toMatch(new RegExp(`Report published: ${TITLE} \\(version 1\\)\\s+to committee@calmcrest\\.test`));
    expect(all).toMatch(new RegExp(`New comment on “${TITLE}”: section “Results”\\s+to lead@calmcrest\\.test`));
    expect(all).toMatch(new RegExp(`Thread resolved on “${TITLE}”: section “Results”\\s+to committee@calmcrest\\.test`));
    await page.locator("summary", { hasText: `Report published: ${TITLE}` }).click();
    const link = page.getByRole("link", { name: new RegExp(`/reports/${reportId}\\?version=1$`) });
    expect(await link.count()).toBe(1);
    await screenshot(page, "reports-outbox-desktop");
    // The HTML part is shown in a sandboxed frame under the same policy.
    expect(await cspViolations()).toEqual([]);
    expect(browser.problems).toEqual([]);
  });

  it("keeps version 1's numbers after a new upload and shows the newer-data banner", async () => {
    const { page } = browser;
    await switchTo("lead");
    await page.goto(`${server.url}/reports/${reportId}`);
    await page.locator(".comparison-table").waitFor();
    const before = await tableText(page);
    expect(await page.locator(".newer-data").count()).toBe(0);

    const sites = (await apiCall("GET", "/sites")).body as unknown as { id: number; name: string }[];
    const quartz = sites.find((site) => site.name === "Quartz Shoulder");
    const detail = (await apiCall("GET", `/sites/${quartz?.id}`)).body as unknown as { campaigns: { id: number }[] };
    // Five nights in January 2026 at the ridge, 03:00-07:00 UTC (its local night), seeing 1.5″ (invented)
    const lines = ["time_utc,seeing_arcsec,zenith_deg"];
    for (let night = 20; night < 25; night += 1) for (let minute = 0; minute <= 240; minute += 5) lines.push(`2026-01-${night}T${String(3 + Math.floor(minute / 60)).padStart(2, "0")}:${String(minute % 60).padStart(2, "0")}:00Z,1.5,20`);
    const upload = await page.request.post(`${server.url}/api/campaigns/${detail.campaigns[0]?.id}/uploads`, {
      headers: { Origin: server.url },
      multipart: { file: { name: "quartz-january.csv", mimeType: "text/csv", buffer: Buffer.from(`${lines.join("\n")}\n`) } },
    });
    expect(upload.status()).toBe(202);
    const uploadId = ((await upload.json()) as { upload: { id: number } }).upload.id;
    await expect.poll(async () => (await apiCall("GET", `/uploads/${uploadId}`)).body.status, { timeout: 60_000 }).toBe("done");

    await page.reload();
    await page.locator(".newer-data").getByText("1 upload since this version; the lead can publish a new version.").waitFor();
    expect(await tableText(page)).toBe(before);
    expect(browser.problems).toEqual([]);
  });

  it("publishes version 2 with the new data and says what changed since version 1", async () => {
    const { page } = browser;
    const before = await tableText(page);
    await page.getByRole("tab", { name: /Draft and editor/ }).click();
    await page.getByLabel("What is new (optional, shown with the version)").fill("January nights added");
    await page.getByRole("button", { name: "Publish version 2" }).click();
    await page.getByText(/^Version 2, published/).waitFor({ timeout: 90_000 });
    expect(await page.locator(".newer-data").count()).toBe(0);
    expect(await tableText(page)).not.toBe(before);
    await page.getByText("What changed since version 1").click();
    const moved = page.locator("table", { hasText: "Numbers that moved" });
    await moved.waitFor();
    expect(await moved.locator("tbody tr", { hasText: "Quartz Shoulder" }).count()).toBeGreaterThan(0);
    expect(await moved.locator("tbody tr", { hasText: "Condor Spur" }).count()).toBe(0);
    expect(await page.getByText(/Version 2 is computed from 1 upload that version 1 did not include/).count()).toBe(1);
    // Version 1 stays readable at its own address, with its own numbers.
    await page.goto(`${server.url}/reports/${reportId}?version=1`);
    await page.getByText("You are reading version 1; the latest is version 2.").waitFor();
    expect(await tableText(page)).toBe(before);
    expect(browser.problems).toEqual([]);
  });

  it("looks right at 1366 and 390 px with no sideways page scroll", async () => {
    const { page } = browser;
    await switchTo("committee");
    for (const [name, viewport] of [["desktop", DESKTOP], ["phone", PHONE]] as const) {
      await page.setViewportSize(viewport);
      await page.goto(`${server.url}/reports/${reportId}`);
      await page.locator(".comparison-table").waitFor();
      await page.waitForSelector(".recharts-surface");
      await page.waitForTimeout(500);
      expect(await sidewaysOverflowPx(page)).toBe(0);
      await screenshot(page, `reports-committee-${name}`);
      await page.goto(`${server.url}/reports`);
      await page.getByRole("link", { name: TITLE }).waitFor();
      expect(await sidewaysOverflowPx(page)).toBe(0);
      await screenshot(page, `reports-list-committee-${name}`);
    }
    await page.setViewportSize(DESKTOP);
    expect(browser.problems).toEqual([]);
  });

  it("prints the report to a PDF with its title block, the table and page numbers, without buttons", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/reports/${reportId}`);
    await page.locator(".comparison-table").waitFor();
    // The charts' code loads on demand: print only once every chart has replaced its "Loading …" stand-in.
    await page.getByText(/^Share of time at or below a seeing value/).first().waitFor();
    await expect.poll(() => page.getByRole("status").filter({ hasText: /^Loading / }).count()).toBe(0);
    await page.waitForSelector(".recharts-surface");
    const pdf = await page.pdf({ format: "A4", printBackground: true });
    const parser = new PDFParse({ data: new Uint8Array(pdf) });
    const { text, total } = await parser.getText();
    await parser.destroy();
    expect(total).toBeGreaterThanOrEqual(2);
    expect(text).toContain(TITLE);
    expect(text).toMatch(/Version 2, published \d{4}-\d{2}-\d{2} by Tomas Reyvik, computed from \d+ uploads/);
    expect(text).toMatch(/Quartz\s+Shoulder/);
    expect(text).toMatch(/Condor\s+Spur/);
    expect(text).toContain("Season-");
    expect(text).toContain(`Page 1 of ${total}`);
    expect(text).toContain("Share of time at or below a seeing value");
    for (const control of ["Sign out", "Print or save as PDF", "Comment on", "Reply", "Mark resolved", "Reopen"]) expect(text).not.toContain(control);
    expect(browser.problems).toEqual([]);
  });
});
