import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { openBrowser, screenshot, signIn, startServer, type BrowserSession, type RunningServer } from "./support/browser";

// Invitations end to end in a real chromium: the administrator invites, the link from the outbox sets a password,
// the new person signs in; the same link a second time and an expired link (invitations last 12 s here) are
// refused with a clear message. Then a password reset from the sign-in page.
const INVITATION_TTL_S = 12;
let server: RunningServer;
let admin: BrowserSession;
let newcomer: BrowserSession;

beforeAll(async () => {
  server = await startServer({ seed: "full", env: { CALMCREST_INVITATION_TTL_S: String(INVITATION_TTL_S) } });
  admin = await openBrowser();
  newcomer = await openBrowser({ width: 390, height: 844 });
});

afterAll(async () => {
  await admin?.close();
  await newcomer?.close();
  await server?.stop();
});

interface OutboxMessage {
  to: string;
  kind: string;
  subject: string;
  links: { label: string; url: string }[];
}

/** The link in the newest e-mail to `to`, as the outbox shows it to the administrator. */
async function linkFor(page: Page, to: string): Promise<string> {
  const outbox = await page.evaluate(async () => (await fetch("/api/outbox")).json() as Promise<{ messages: OutboxMessage[] }>);
  const message = outbox.messages.find((candidate) => candidate.to === to);
  const url = message?.links[0]?.url ?? "";
  // Links point at the configured public address (here the local default http://localhost:PORT); the test server
  // listens on 127.0.0.1 at that port, so the same link is opened there.
  const port = new URL(server.url).port;
  expect(url.startsWith(`http://localhost:${port}/set-password?token=`)).toBe(true);
  return url.replace(`http://localhost:${port}`, server.url);
}

async function invite(page: Page, name: string, email: string, role: string, campaign?: RegExp) {
  const form = page.getByRole("form", { name: "Invite a person" });
  await form.getByLabel("Name").fill(name);
  await form.getByLabel("E-mail").fill(email);
  await form.getByLabel("Role").selectOption({ label: role });
  if (campaign) await form.getByRole("checkbox", { name: campaign }).check();
  await form.getByRole("button", { name: "Send invitation" }).click();
  await expect.poll(() => page.getByRole("status").filter({ hasText: "Saved." }).textContent()).toMatch(new RegExp(`Invitation sent to ${name}`));
}

let expiringInvitedAtMs = 0;

describe("invitations in a browser", () => {
  it("lets the administrator invite a field engineer to a campaign, and another person whose link will expire", async () => {
    const { page } = admin;
    await signIn(page, server.url, "admin");
    await page.goto(`${server.url}/admin/people`);
    await invite(page, "Omar Haddad", "omar.haddad@calmcrest.test", "Committee member");
    expiringInvitedAtMs = Date.now();
    await invite(page, "Nadia Ferreira", "nadia.ferreira@calmcrest.test", "Field engineer", /Tern Ridge north mast/);
    const row = page.getByRole("listitem", { name: "Nadia Ferreira" });
    await expect.poll(() => row.textContent()).toMatch(/Invited, no password yet.*Tern Ridge — Tern Ridge north mast/s);
    await screenshot(page, "invite-people-1366");
  });

  it("opens the link from the outbox, refuses a weak password with the rule, sets a good one, and the new person signs in", async () => {
    const link = await linkFor(admin.page, "nadia.ferreira@calmcrest.test");
    const { page } = newcomer;
    await page.goto(link);
    await page.getByRole("heading", { name: "Welcome, Nadia Ferreira: choose your password" }).waitFor();
    await expect.poll(() => page.locator("main").textContent()).toMatch(/At least 12 characters; not your e-mail address or name/);
    await page.getByLabel("New password").fill("NadiaFerreira-99");
    await page.getByRole("button", { name: "Save the password" }).click();
    await expect.poll(() => page.locator("#new-password-error").textContent()).toMatch(/Do not use your e-mail address or your name/);
    await screenshot(page, "invite-set-password-390");
    await page.getByLabel("New password").fill("copper kestrel meadow");
    await page.getByRole("button", { name: "Save the password" }).click();
    await page.waitForURL(/\/sign-in\?password=set/);
    await expect.poll(() => page.getByRole("status").textContent()).toMatch(/Your password is saved/);
    expect(await page.getByLabel("E-mail").inputValue()).toBe("nadia.ferreira@calmcrest.test");
    await page.getByLabel("Password").fill("copper kestrel meadow");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/sites/);
    await expect.poll(() => page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents()).toContain("Upload logs");
    // A field engineer sees the sites of their campaigns only: the one they were invited to.
    await expect.poll(() => page.locator("main").textContent()).toMatch(/Tern Ridge/);
    await expect.poll(() => page.locator("main").textContent()).not.toMatch(/Quartz Shoulder/);
  });

  it("refuses the same link a second time, saying it was used", async () => {
    const link = await linkFor(admin.page, "nadia.ferreira@calmcrest.test");
    const { page } = newcomer;
    await page.goto(link);
    await page.getByRole("heading", { name: "This link cannot be used" }).waitFor();
    await expect.poll(() => page.getByRole("alert").textContent()).toMatch(/This invitation has been used already; each link works once/);
  });

  it("refuses an expired invitation with when it expired and what to do", async () => {
    const link = await linkFor(admin.page, "omar.haddad@calmcrest.test");
    const waitMs = expiringInvitedAtMs + INVITATION_TTL_S * 1000 + 500 - Date.now();
    if (waitMs > 0) await new Promise((resolve) => setTimeout(resolve, waitMs));
    const { page } = newcomer;
    await page.goto(link);
    await page.getByRole("heading", { name: "This link cannot be used" }).waitFor();
    await expect.poll(() => page.getByRole("alert").textContent()).toMatch(/This invitation expired on \d{4}-\d\d-\d\d \d\d:\d\d UTC\. Ask an administrator to send a new invitation\./);
    await screenshot(page, "invite-link-expired-390");
  });

  it("resets a forgotten password from the sign-in page through the e-mailed link", async () => {
    const { page } = newcomer;
    await page.context().clearCookies();
    await page.goto(`${server.url}/sign-in`);
    await page.getByRole("link", { name: "Forgotten your password?" }).click();
    // The sign-in form has an "E-mail" field too: wait for the new page before typing, or the address lands on the old one.
    await page.getByRole("heading", { name: "Forgotten password" }).waitFor();
    await page.getByLabel("E-mail").fill("nadia.ferreira@calmcrest.test");
    await page.getByRole("button", { name: "Send me a link" }).click();
    await expect.poll(() => page.getByRole("status").textContent()).toMatch(/If nadia.ferreira@calmcrest.test belongs to an active Calmcrest account, a link/);
    await expect.poll(async () => (await admin.page.evaluate(async () => (await fetch("/api/outbox")).json() as Promise<{ messages: OutboxMessage[] }>)).messages.some((message) => message.kind === "password_reset")).toBe(true);
    await page.goto(await linkFor(admin.page, "nadia.ferreira@calmcrest.test"));
    await page.getByRole("heading", { name: "Choose a new password" }).waitFor();
    await page.getByLabel("New password").fill("harbour lichen comet");
    await page.getByRole("button", { name: "Save the password" }).click();
    await page.waitForURL(/\/sign-in\?password=set/);
    await page.getByLabel("Password").fill("harbour lichen comet");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/sites/);
  });

  it("saw no page errors or console errors", () => {
    // The refused links answer 410, which chromium logs as a failed resource.
    expect([...admin.problems, ...newcomer.problems].filter((problem) => !/status of 410/.test(problem))).toEqual([]);
  });
});
