import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openBrowser, screenshot, signIn, startServer, type BrowserSession, type RunningServer, type Role } from "./support/browser";

// Signs in as each demo role in a real chromium and checks the navigation shows that role's screens only.
let server: RunningServer;
let browser: BrowserSession;

beforeAll(async () => {
  server = await startServer({ seed: "users" });
  browser = await openBrowser();
});

afterAll(async () => {
  await browser?.close();
  await server?.stop();
});

const expectedNav: Record<Role, string[]> = {
  admin: ["Sites", "Compare", "Reports", "People and access", "Audit log", "Outbox"],
  lead: ["Sites", "Compare", "Upload logs", "Reports"],
  engineer: ["Sites", "Compare", "Upload logs"],
  committee: ["Reports"],
};

describe("the app shell in a browser", () => {
  it("sends a signed-out visitor to sign-in and explains a wrong password", async () => {
    const { page } = browser;
    await page.goto(`${server.url}/sites`);
    await page.waitForURL(/\/sign-in\?next=%2Fsites/);
    await page.getByLabel("E-mail").fill("lead@calmcrest.test");
    await page.getByLabel("Password").fill("wrong-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect.poll(() => page.getByRole("alert").textContent()).toMatch(/do not match an account/);
    await screenshot(page, "shell-sign-in-error");
  });

  for (const role of Object.keys(expectedNav) as Role[]) {
    it(`shows ${role} only their own navigation`, async () => {
      const { page } = browser;
      await signIn(page, server.url, role);
      const nav = page.getByRole("navigation", { name: "Main" });
      await expect.poll(() => nav.getByRole("link").allTextContents()).toEqual(expectedNav[role]);
      await screenshot(page, `shell-${role}`);
      await page.getByRole("button", { name: "Sign out" }).click();
      await page.waitForURL(/\/sign-in/);
    });
  }

  it("keeps committee members out of the field screens", async () => {
    const { page } = browser;
    await signIn(page, server.url, "committee");
    await page.goto(`${server.url}/upload`);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toMatch(/not part of your role/);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
  });

  it("saw no page errors or console errors", () => {
    expect(browser.problems).toEqual([]);
  });
});
