import { spawn, type ChildProcess } from "node:child_process";
import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { chromium, type BrowserContext, type Page } from "playwright-core";

export const repoRoot = join(dirname(fileURLToPath(import.meta.url)), "../..");
export const screenshotDir = join(repoRoot, "tests/screenshots");
export const DEMO_PASSWORD = "browser-test-pass";
export type Role = "admin" | "lead" | "engineer" | "committee";

// Flags from ../shared/STACK.md: without the background-networking ones chromium keeps dialling out on a closed network.
const CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.listen(0, "127.0.0.1", () => {
      const address = probe.address();
      probe.close(() => (typeof address === "object" && address ? resolve(address.port) : reject(new Error("no port"))));
    });
  });
}

export interface RunningServer {
  url: string;
  dataDir: string;
  stop(): Promise<void>;
}

/** Starts the real server (tsx, its own process group) on a free port and a temporary data directory. */
export async function startServer(options: { seed?: "full" | "users" | "none"; env?: Record<string, string> } = {}): Promise<RunningServer> {
  const port = await freePort();
  const dataDir = mkdtempSync(join(tmpdir(), "calmcrest-browser-"));
  let output = "";
  const child: ChildProcess = spawn(join(repoRoot, "node_modules/.bin/tsx"), [join(repoRoot, "apps/server/src/main.ts")], {
    cwd: repoRoot,
    detached: true,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: options.seed ?? "full", DEMO_PASSWORD, NODE_ENV: "test", ...options.env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  child.stdout?.on("data", (chunk) => (output += String(chunk)));
  child.stderr?.on("data", (chunk) => (output += String(chunk)));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 150_000;
  for (;;) {
    if (child.exitCode !== null) throw new Error(`server exited early (${child.exitCode}):\n${output}`);
    try {
      const response = await fetch(`${url}/api/health`);
      if (response.ok) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error(`server did not start in time:\n${output}`);
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  return {
    url,
    dataDir,
    async stop() {
      if (child.pid && child.exitCode === null) {
        const exited = new Promise((resolve) => child.once("exit", resolve));
        process.kill(-child.pid, "SIGTERM");
        await exited;
      }
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export interface BrowserSession {
  context: BrowserContext;
  page: Page;
  /** Page errors and console errors seen so far; tests assert it stays empty. */
  problems: string[];
  close(): Promise<void>;
}

export async function openBrowser(viewport = { width: 1366, height: 900 }): Promise<BrowserSession> {
  const profileDir = mkdtempSync(join(tmpdir(), "calmcrest-chromium-"));
  const context = await chromium.launchPersistentContext(profileDir, { executablePath: "/usr/bin/chromium", args: CHROMIUM_ARGS, viewport });
  const page = context.pages()[0] ?? (await context.newPage());
  const problems: string[] = [];
  page.on("pageerror", (error) => problems.push(`page error: ${error.message}`));
  page.on("console", (message) => {
    // A 401 from /api/me before sign-in is expected and logged by chromium as a failed resource.
    if (message.type() === "error" && !/status of 401/.test(message.text())) problems.push(`console: ${message.text()}`);
  });
  return {
    context,
    page,
    problems,
    async close() {
      await context.close();
      rmSync(profileDir, { recursive: true, force: true });
    },
  };
}

/** A signed-in API client for test setup: GET without `send`, else POST of its JSON `body` or multipart `form`; throws on a non-2xx answer. */
export type ApiClient = <T>(path: string, send?: { body?: unknown; form?: FormData }) => Promise<T>;

/** Signs `role` in through the API (screens under test are driven through the browser; setup goes this way). */
export async function apiAs(baseUrl: string, role: Role, password = DEMO_PASSWORD): Promise<ApiClient & { cookie: string }> {
  const response = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: "POST",
    headers: { "Content-Type": "application/json", Origin: baseUrl },
    body: JSON.stringify({ email: `${role}@calmcrest.test`, password }),
  });
  if (response.status !== 200) throw new Error(`sign-in as ${role}: ${response.status} ${await response.text()}`);
  const cookie = (response.headers.get("set-cookie") ?? "").split(";")[0] ?? "";
  const client = async <T>(path: string, send?: { body?: unknown; form?: FormData }): Promise<T> => {
    const answer = await fetch(`${baseUrl}/api${path}`, {
      method: send === undefined ? "GET" : "POST",
      headers: { Cookie: cookie, Origin: baseUrl, ...(send?.body === undefined ? {} : { "Content-Type": "application/json" }) },
      body: send?.form ?? (send?.body === undefined ? undefined : JSON.stringify(send.body)),
    });
    if (!answer.ok) throw new Error(`${path}: ${answer.status} ${await answer.text()}`);
    return (await answer.json()) as T;
  };
  return Object.assign(client, { cookie });
}

export async function signIn(page: Page, baseUrl: string, role: Role, password = DEMO_PASSWORD) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel("E-mail").fill(`${role}@calmcrest.test`);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

export async function screenshot(page: Page, name: string) {
  mkdirSync(screenshotDir, { recursive: true });
  const path = join(screenshotDir, `${name}.png`);
  await page.screenshot({ path, fullPage: true });
  return path;
}
