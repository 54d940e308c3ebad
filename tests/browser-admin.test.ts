import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { DEMO_PASSWORD, openBrowser, screenshot, signIn, startServer, type BrowserSession, type RunningServer } from "./support/browser";

// Administration in a real chromium: safe role changes (a keyboard user meets the confirmation, then "saved" and
// undo), the last administrator's locked role, deactivation ending an open session, the sign-in limit triggering
// and lifting (a 3-failure, 4-second window configured for the test), the audit log page, at three widths.
let server: RunningServer;
let admin: BrowserSession;
let other: BrowserSession;

beforeAll(async () => {
  server = await startServer({ seed: "full", env: { CALMCREST_SIGNIN_MAX_FAILURES: "3", CALMCREST_SIGNIN_WINDOW_S: "4" } });
  admin = await openBrowser();
  other = await openBrowser();
});

afterAll(async () => {
  await admin?.close();
  await other?.close();
  await server?.stop();
});

interface Person {
  id: string;
  email: string;
  name: string;
  role: string;
  status: string;
}

/** The people list as the server has it (through the admin's session in the page). */
async function people(page: Page): Promise<Person[]> {
  return page.evaluate(async () => (await fetch("/api/users")).json() as Promise<Person[]>);
}
const byEmail = async (page: Page, email: string) => (await people(page)).find((person) => person.email === email);

/** The page has no sideways scroll at this width. */
async function fitsWidth(page: Page): Promise<boolean> {
  // A string, evaluated in the page (this package is typed without the DOM library).
  return page.evaluate<boolean>("document.documentElement.scrollWidth <= document.documentElement.clientWidth");
}

describe("administration in a browser", () => {
  it("lets a keyboard user reach the role change only through a confirmation that says what changes, then shows saved and undoes", async () => {
    const { page } = admin;
    await signIn(page, server.url, "admin");
    await page.goto(`${server.url}/admin/people`);
    await page.getByRole("heading", { name: "People and access" }).waitFor();
    await screenshot(page, "admin-people-1366");

    // Keyboard only: focus the button, open with Enter, move through the roles with the arrow keys.
    await page.getByRole("button", { name: "Change role of Lena Marchetti" }).focus();
    await page.keyboard.press("Enter");
    const dialog = page.getByRole("dialog", { name: "Change the role of Lena Marchetti" });
    await dialog.waitFor();
    await expect.poll(() => page.evaluate<string | undefined>("document.activeElement?.getAttribute('type')")).toBe("radio");
    await expect.poll(() => page.evaluate<string | undefined>("document.activeElement?.value")).toBe("engineer");
    // One arrow key picks the next role (committee member): shown, not saved.
    await page.keyboard.press("ArrowDown");
    // Choosing in the dialog changes nothing yet: the server still has the engineer role.
    expect((await byEmail(page, "engineer@calmcrest.test"))?.role).toBe("engineer");
    await expect.poll(() => dialog.textContent()).toMatch(/Field engineer to Committee member.*Gains.*read reports.*Loses.*upload logs to their own campaigns/s);
    await screenshot(page, "admin-role-dialog-1366");
    // Escape cancels.
    await page.keyboard.press("Escape");
    await expect.poll(() => dialog.isVisible()).toBe(false);
    expect((await byEmail(page, "engineer@calmcrest.test"))?.role).toBe("engineer");

    // Now confirm a change to survey lead.
    await page.getByRole("button", { name: "Change role of Lena Marchetti" }).click();
    await dialog.getByRole("radio", { name: /Survey lead/ }).check();
    await expect.poll(() => dialog.textContent()).toMatch(/Gains.*read every site and campaign.*Loses.*read the sites of their own campaigns/s);
    await dialog.getByRole("button", { name: "Change role to Survey lead" }).click();
    const saved = page.getByRole("status").filter({ hasText: "Saved." });
    await expect.poll(() => saved.textContent()).toMatch(/Lena Marchetti is now Survey lead \(was Field engineer\)/);
    expect((await byEmail(page, "engineer@calmcrest.test"))?.role).toBe("lead");
    await screenshot(page, "admin-role-saved-1366");
    await saved.getByRole("button", { name: /Undo/ }).click();
    await expect.poll(() => page.getByRole("status").filter({ hasText: "Undone" }).count()).toBe(1);
    await expect.poll(async () => (await byEmail(page, "engineer@calmcrest.test"))?.role).toBe("engineer");
  });

  it("locks the last administrator's own role with the reason, and the server refuses it with a 409", async () => {
    const { page } = admin;
    const row = page.getByRole("listitem", { name: "Ines Okafor" });
    await expect.poll(() => row.textContent()).toMatch(/Locked: the last active administrator keeps this role/);
    expect(await row.getByRole("button", { name: /Change role/ }).count()).toBe(0);
    const me = await byEmail(page, "admin@calmcrest.test");
    const answer = await page.evaluate(async (id) => {
      const response = await fetch(`/api/users/${id}`, { method: "PATCH", headers: { "Content-Type": "application/json" }, body: JSON.stringify({ role: "lead" }) });
      return { status: response.status, body: (await response.json()) as { error: { code: string; message: string } } };
    }, me?.id ?? "");
    expect(answer.status).toBe(409);
    expect(answer.body.error.code).toBe("last_admin");
  });

  it("ends an open session at once when the account is deactivated, and tells the person at sign-in", async () => {
    await signIn(other.page, server.url, "lead");
    await other.page.goto(`${server.url}/sites`);
    const lead = await byEmail(admin.page, "lead@calmcrest.test");
    await admin.page.goto(`${server.url}/admin/people/${lead?.id ?? ""}`);
    await admin.page.getByRole("button", { name: "Deactivate…" }).click();
    const dialog = admin.page.getByRole("dialog", { name: "Deactivate Tomas Reyvik?" });
    await expect.poll(() => dialog.textContent()).toMatch(/Every session of Tomas Reyvik ends at once/);
    await dialog.getByRole("button", { name: "Deactivate and end sessions" }).click();
    await expect.poll(() => admin.page.getByRole("status").filter({ hasText: "Saved." }).textContent()).toMatch(/deactivated and signed out everywhere/);
    await screenshot(admin.page, "admin-person-deactivated-1366");

    // The lead's open page: the next request finds no session.
    const status = await other.page.evaluate(async () => (await fetch("/api/me")).status);
    expect(status).toBe(401);
    await other.page.goto(`${server.url}/sites`);
    await other.page.waitForURL(/\/sign-in/);
    await other.page.getByLabel("E-mail").fill("lead@calmcrest.test");
    await other.page.getByLabel("Password").fill(DEMO_PASSWORD);
    await other.page.getByRole("button", { name: "Sign in" }).click();
    await expect.poll(() => other.page.getByRole("alert").textContent()).toMatch(/deactivated/);

    await admin.page.getByRole("button", { name: "Reactivate" }).click();
    await admin.page.getByRole("dialog", { name: "Reactivate Tomas Reyvik?" }).getByRole("button", { name: "Reactivate" }).click();
    await expect.poll(async () => (await byEmail(admin.page, "lead@calmcrest.test"))?.status).toBe("active");
  });

  it("holds back sign-in after too many failures with the wait in words, and lets it through after the wait", async () => {
    const { page } = other;
    await page.goto(`${server.url}/sign-in`);
    for (let attempt = 0; attempt < 3; attempt += 1) {
      await page.getByLabel("E-mail").fill("committee@calmcrest.test");
      await page.getByLabel("Password").fill(`wrong-password-${attempt}`);
      await page.getByRole("button", { name: "Sign in" }).click();
      await expect.poll(() => page.getByRole("alert").textContent()).toMatch(/do not match an account/);
    }
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect.poll(() => page.getByRole("alert").textContent()).toMatch(/Too many failed sign-ins.*Wait \d seconds?, then try again/);
    await screenshot(page, "admin-sign-in-limited");
    await page.waitForTimeout(4200);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
  });

  it("shows the audit log with filters, paging and the refused sign-ins, and a person's recent actions", async () => {
    const { page } = admin;
    await page.goto(`${server.url}/admin/audit`);
    await page.getByRole("heading", { name: "Audit log" }).waitFor();
    await expect.poll(() => page.getByRole("navigation", { name: "Pages of the audit log" }).textContent()).toMatch(/Rows 1–\d+ of \d+/);
    await page.getByLabel("Action").selectOption({ label: "Sign-in refused" });
    await page.getByRole("button", { name: "Show" }).click();
    await page.waitForURL(/action=auth.sign_in_failed/);
    await expect.poll(() => page.locator("tbody tr").count()).toBe(5);
    await expect.poll(() => page.locator("tbody").textContent()).toMatch(/too many failures, waiting/);
    await screenshot(page, "admin-audit-1366");
    const csv = await page.evaluate(async (href) => (await fetch(href)).text(), (await page.getByRole("link", { name: /Download CSV/ }).getAttribute("href")) ?? "");
    expect(csv.split("\n").filter(Boolean)).toHaveLength(6);

    const engineer = await byEmail(page, "engineer@calmcrest.test");
    await page.goto(`${server.url}/admin/people/${engineer?.id ?? ""}`);
    await expect.poll(() => page.getByRole("region", { name: "Recent actions" }).textContent()).toMatch(/Role changed.*Role Survey lead → Field engineer \(undo\)/s);
  });

  for (const width of [820, 390]) {
    it(`fits the administration screens into ${width} px without sideways scrolling`, async () => {
      const { page } = admin;
      await page.setViewportSize({ width, height: 900 });
      await page.goto(`${server.url}/admin/people`);
      await page.getByRole("heading", { name: "People and access" }).waitFor();
      expect(await fitsWidth(page)).toBe(true);
      // Every "Change role…" button is inside the page, not clipped at its right edge.
      const boxes = await page.getByRole("button", { name: /^Change role of/ }).evaluateAll((buttons) => buttons.map((button) => button.getBoundingClientRect().right));
      expect(Math.max(...boxes)).toBeLessThanOrEqual(width);
      await screenshot(page, `admin-people-${width}`);
      await page.getByRole("button", { name: "Change role of Lena Marchetti" }).click();
      await screenshot(page, `admin-role-dialog-${width}`);
      await page.keyboard.press("Escape");
      await page.goto(`${server.url}/admin/audit`);
      await page.getByRole("heading", { name: "Audit log" }).waitFor();
      expect(await fitsWidth(page)).toBe(true);
      await screenshot(page, `admin-audit-${width}`);
      const engineer = await byEmail(page, "engineer@calmcrest.test");
      await page.goto(`${server.url}/admin/people/${engineer?.id ?? ""}`);
      await page.getByRole("heading", { name: "Recent actions" }).waitFor();
      expect(await fitsWidth(page)).toBe(true);
      await screenshot(page, `admin-person-${width}`);
    });
  }

  it("lets a person end all their own sessions from their account page", async () => {
    // The committee member signed in at the end of the sign-in limit test.
    const { page } = other;
    await page.goto(`${server.url}/account`);
    await page.getByRole("button", { name: "Sign out everywhere" }).click();
    await page.getByRole("dialog", { name: "Sign out on every device?" }).getByRole("button", { name: "Sign out everywhere" }).click();
    await page.waitForURL(/\/sign-in/);
    expect(await page.evaluate(async () => (await fetch("/api/me")).status)).toBe(401);
  });

  it("saw no page errors or console errors", () => {
    // The refused sign-ins (401, 403, 429) and the refused demotion (409) are logged by chromium as failed resources.
    expect([...admin.problems, ...other.problems].filter((problem) => !/status of (403|409|429)/.test(problem))).toEqual([]);
  });
});
