// Benchmark of the web app's first load (issue 15). Two kinds of figure:
//  1. What a page must download before it shows anything, from the built app's Vite manifest: the entry chunk and
//     every chunk it imports statically (the modulepreloads of index.html), plus the page's own route chunk and its
//     static imports; gzip -9 of each file, summed. The map (Leaflet) and the charts (recharts) are loaded on demand
//     and are given separately.
//  2. A site page with every chart interactive, on a cold browser cache against a local server with the demo data:
//     a fresh chromium profile per run, the lead signed in by a request (so no page has been loaded yet), then the
//     clock of the Performance API (performance.now(), zero at navigation start) read in the page when
//       (a) every chart of the page's Charts section has drawn its SVG with its data, and
//       (b) a pointer moved onto the night chart (the last to get its data: it asks for single samples) shows its
//           tooltip.
//     Median of `runs` runs; one run before them is reported on its own (the server computing the summary cold).
// Run through bench/run.ts (`npm run bench -- --only web`). Speed is measured here, never asserted.
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { constants, gzipSync } from "node:zlib";
import { chromium } from "playwright-core";
import { median } from "./childProcess.ts";
import { stopServer } from "./compare.ts";
import { freePort, waitForHealth } from "./ingest.ts";
import { serverCommand } from "../scripts/server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const webDir = join(root, "apps/web");
const distDir = join(webDir, "dist");
const manifestPath = join(distDir, ".vite/manifest.json");
const serverDir = join(root, "apps/server");
/** The demo seed's password for its invented accounts (DEMO_PASSWORD's default). */
const DEMO_PASSWORD = "calmcrest-demo";
// Flags from shared/STACK.md (as tests/support/browser.ts): no background network on a closed machine.
const CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];
const VIEWPORT = { width: 1366, height: 900 };

interface ManifestChunk {
  file: string;
  imports?: string[];
  isEntry?: boolean;
}
type Manifest = Record<string, ManifestChunk>;

/** The newest modification time (ms) of the source files below `dir` (tests, which never reach the bundle, left out). */
function newestSourceMtimeMs(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    if (entry.name === "node_modules" || entry.name === "dist" || /\.test\.tsx?$/.test(entry.name)) continue;
    const path = join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestSourceMtimeMs(path) : statSync(path).mtimeMs);
  }
  return newest;
}

/** Builds the web app when it has no manifest or any source (the app's or its shared packages') is newer. */
function ensureWebBuild(): void {
  const packageSources = ["contracts", "seeing-stats"].map((name) => newestSourceMtimeMs(join(root, "packages", name, "src")));
  const sourcesMs = Math.max(newestSourceMtimeMs(join(webDir, "src")), statSync(join(webDir, "index.html")).mtimeMs, statSync(join(webDir, "vite.config.ts")).mtimeMs, ...packageSources);
  if (existsSync(manifestPath) && statSync(manifestPath).mtimeMs >= sourcesMs) return;
  console.log("bench web: building the web app (vite build)…");
  const build = spawnSync(join(webDir, "node_modules/.bin/vite"), ["build"], { cwd: webDir, encoding: "utf8" });
  if (build.status !== 0) throw new Error(`vite build failed:\n${build.stdout}\n${build.stderr}`);
}

/** The chunk and every chunk it imports statically, transitively (what the browser must fetch before running it). */
function staticClosure(manifest: Manifest, key: string, into = new Set<string>()): Set<string> {
  if (into.has(key)) return into;
  const chunk = manifest[key];
  if (!chunk) throw new Error(`bench web: the Vite manifest has no chunk for ${key}`);
  into.add(key);
  for (const imported of chunk.imports ?? []) staticClosure(manifest, imported, into);
  return into;
}

const gzipKb = (manifest: Manifest, keys: Iterable<string>) => {
  let bytes = 0;
  for (const key of keys) {
    const chunk = manifest[key];
    if (chunk) bytes += gzipSync(readFileSync(join(distDir, chunk.file)), { level: constants.Z_BEST_COMPRESSION }).length;
  }
  return Number((bytes / 1024).toFixed(1));
};

/** Gzip sizes (kB) of what the sign-in, sites and site pages load first, and of the map's and charts' code on demand. */
export function initialJavaScript(): Record<string, number> {
  const manifest = JSON.parse(readFileSync(manifestPath, "utf8")) as Manifest;
  const entryKey = Object.keys(manifest).find((key) => manifest[key]?.isEntry);
  if (!entryKey) throw new Error("bench web: the Vite manifest has no entry chunk");
  const entry = staticClosure(manifest, entryKey);
  const withPage = (routeKey: string) => staticClosure(manifest, routeKey, new Set(entry));
  const sites = withPage("src/routes/sites.tsx");
  const site = withPage("src/routes/sites.$siteId.tsx");
  const beyond = (key: string, loaded: Set<string>) => [...staticClosure(manifest, key)].filter((chunk) => !loaded.has(chunk));
  return {
    // The sign-in page is part of the entry (it is the first page of everyone).
    signInInitialGzipKb: gzipKb(manifest, entry),
    sitesInitialGzipKb: gzipKb(manifest, sites),
    sitePageInitialGzipKb: gzipKb(manifest, site),
    mapOnDemandGzipKb: gzipKb(manifest, beyond("src/components/site-map.tsx", sites)),
    chartsOnDemandGzipKb: gzipKb(manifest, beyond("src/components/seeing-charts.tsx", site)),
  };
}

function startServer(dataDir: string, port: number): ChildProcess {
  // The demo data (CALMCREST_SEED=full) as `npm start` seeds it on this machine; the built app served by the API's process.
  return spawn(process.execPath, serverCommand().args, {
    cwd: serverDir,
    env: { ...process.env, PORT: String(port), HOST: "127.0.0.1", CALMCREST_DATA_DIR: dataDir, CALMCREST_SEED: "full", DEMO_PASSWORD, NODE_ENV: "development" },
    stdio: ["ignore", "ignore", "inherit"],
  });
}

/** The demo site with the most stored samples (the heaviest site page). */
async function heaviestSite(base: string): Promise<{ id: number; name: string; samples: number }> {
  const signIn = await fetch(`${base}/api/auth/sign-in`, {
    method: "POST",
    headers: { Origin: base, "Content-Type": "application/json" },
    body: JSON.stringify({ email: "lead@calmcrest.test", password: DEMO_PASSWORD }),
  });
  if (!signIn.ok) throw new Error(`bench web: sign-in failed: ${signIn.status}`);
  const cookie = (signIn.headers.get("set-cookie") ?? "").split(";")[0] ?? "";
  const sites = (await (await fetch(`${base}/api/sites`, { headers: { Cookie: cookie } })).json()) as { id: number; name: string; summary: { samples: number } | null }[];
  const best = [...sites].sort((a, b) => (b.summary?.samples ?? 0) - (a.summary?.samples ?? 0))[0];
  if (!best?.summary) throw new Error("bench web: the demo data has no site with samples");
  return { id: best.id, name: best.name, samples: best.summary.samples };
}

interface PageRun {
  /** performance.now() in the page when every chart had drawn its SVG. */
  chartsDrawnMs: number;
  /** performance.now() when the night chart's tooltip showed under the pointer. */
  interactiveMs: number;
  charts: number;
  /** JavaScript fetched by the page (bytes as served), and how many files. */
  javascriptKb: number;
  javascriptFiles: number;
  /** CPU time of the page's main thread, and of its script, layout and style work, until interactive (ms). */
  mainThreadCpuMs: number;
  scriptMs: number;
  layoutAndStyleMs: number;
  /** Every file and request of the page, with its start and end (ms after navigation start), for reading a slow run. */
  requests: { path: string; startMs: number; endMs: number; bytes: number }[];
}

/** One cold run: a new chromium profile (empty cache), the lead signed in by a request, then the site page. */
export async function measureSitePage(base: string, siteId: number): Promise<PageRun> {
  const profileDir = mkdtempSync(join(tmpdir(), "calmcrest-bench-chromium-"));
  const context = await chromium.launchPersistentContext(profileDir, { executablePath: "/usr/bin/chromium", args: CHROMIUM_ARGS, viewport: VIEWPORT });
  try {
    // The context's request API shares its cookie jar: the session cookie is set without loading any page.
    const signIn = await context.request.post(`${base}/api/auth/sign-in`, { headers: { Origin: base }, data: { email: "lead@calmcrest.test", password: DEMO_PASSWORD } });
    if (!signIn.ok()) throw new Error(`bench web: sign-in in the browser failed: ${signIn.status()}`);
    const page = context.pages()[0] ?? (await context.newPage());
    // The renderer's own counters: its main thread's CPU time is a steadier figure than the clock on a shared machine.
    const devtools = await context.newCDPSession(page);
    await devtools.send("Performance.enable");
    await page.goto(`${base}/sites/${siteId}`, { waitUntil: "commit" });
    // (a) Every chart figure of the Charts section holds a drawn recharts SVG (the night and axis charts only draw one
    // once their samples have arrived; before that they show a sentence).
    const drawn = await page.waitForFunction(
      () => {
        const section = document.querySelector('section[aria-labelledby="charts-heading"]');
        const figures = section ? [...section.querySelectorAll("figure")] : [];
        if (figures.length === 0 || !figures.every((figure) => figure.querySelector("svg.recharts-surface"))) return null;
        return { atMs: performance.now(), charts: figures.length };
      },
      undefined,
      { polling: "raf", timeout: 120_000 },
    );
    const { atMs: chartsDrawnMs, charts } = (await drawn.jsonValue()) as { atMs: number; charts: number };
    // (b) The pointer onto the middle of the night chart's plot; its tooltip must show.
    const nightChart = page.locator('section[aria-labelledby="charts-heading"] figure', { hasText: "Seeing through the night of" }).locator("svg.recharts-surface").first();
    // Scrolled into view as a person would; the pointer goes to the middle of the plot, above the range slider.
    await nightChart.scrollIntoViewIfNeeded();
    const box = await nightChart.boundingBox();
    if (!box) throw new Error("bench web: the night chart has no box on the page");
    await page.mouse.move(box.x + box.width / 2, box.y + box.height * 0.4);
    const interactive = await page.waitForFunction(
      () => {
        const figure = [...document.querySelectorAll('section[aria-labelledby="charts-heading"] figure')].find((candidate) => candidate.textContent?.includes("Seeing through the night of"));
        const tooltip = figure?.querySelector<HTMLElement>(".recharts-tooltip-wrapper");
        if (!tooltip || getComputedStyle(tooltip).visibility !== "visible" || !/UTC/.test(tooltip.textContent ?? "")) return null;
        return performance.now();
      },
      undefined,
      { polling: "raf", timeout: 30_000 },
    );
    const interactiveMs = (await interactive.jsonValue()) as number;
    const { metrics } = await devtools.send("Performance.getMetrics");
    const metric = (name: string) => Math.round((metrics.find((entry) => entry.name === name)?.value ?? 0) * 1000);
    const resources = await page.evaluate(() =>
      (performance.getEntriesByType("resource") as PerformanceResourceTiming[]).map((entry) => ({
        path: new URL(entry.name).pathname + new URL(entry.name).search.slice(0, 40),
        startMs: Math.round(entry.startTime),
        endMs: Math.round(entry.responseEnd),
        bytes: entry.encodedBodySize,
      })),
    );
    const scripts = resources.filter((entry) => entry.path.endsWith(".js")).map((entry) => entry.bytes);
    return { chartsDrawnMs, interactiveMs, charts, javascriptKb: Number((scripts.reduce((sum, bytes) => sum + bytes, 0) / 1024).toFixed(1)), javascriptFiles: scripts.length,
      mainThreadCpuMs: metric("ThreadTime"),
      scriptMs: metric("ScriptDuration"),
      layoutAndStyleMs: metric("LayoutDuration") + metric("RecalcStyleDuration"),
      requests: resources,
    };
  } finally {
    await context.close();
    rmSync(profileDir, { recursive: true, force: true });
  }
}

export async function run({ runs = 5 }: { rows: number; runs?: number }): Promise<Record<string, number | string>> {
  ensureWebBuild();
  const sizes = initialJavaScript();
  const dataDir = mkdtempSync(join(tmpdir(), "calmcrest-bench-web-"));
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const server = startServer(dataDir, port);
  try {
    // Seeding the demo (four ridges, a few hundred thousand samples) takes a while on a busy machine.
    await waitForHealth(base, server, 300_000);
    const site = await heaviestSite(base);
    const loadBefore = loadavg()[0] ?? 0;
    const first = await measureSitePage(base, site.id);
    const measured: PageRun[] = [];
    for (let index = 0; index < runs; index += 1) measured.push(await measureSitePage(base, site.id));
    const round = (ms: number) => Math.round(ms);
    return {
      ...sizes,
      initialTargetGzipKb: 200,
      sitePage: `${site.name} (${site.samples} samples)`,
      charts: measured[0]?.charts ?? 0,
      coldRuns: runs,
      medianChartsDrawnMs: round(median(measured.map((entry) => entry.chartsDrawnMs))),
      medianInteractiveMs: round(median(measured.map((entry) => entry.interactiveMs))),
      interactiveRunsMs: measured.map((entry) => round(entry.interactiveMs)).join(" "),
      interactiveTargetMs: 1500,
      firstRunServerColdInteractiveMs: round(first.interactiveMs),
      // Less swayed by other work on the machine than the clock: the renderer's main thread's own CPU time until interactive.
      medianMainThreadCpuMs: round(median(measured.map((entry) => entry.mainThreadCpuMs))),
      medianScriptMs: round(median(measured.map((entry) => entry.scriptMs))),
      medianLayoutAndStyleMs: round(median(measured.map((entry) => entry.layoutAndStyleMs))),
      javascriptFetchedKb: measured[0]?.javascriptKb ?? 0,
      javascriptFiles: measured[0]?.javascriptFiles ?? 0,
      loadAverage1m: Number(((loadBefore + (loadavg()[0] ?? 0)) / 2).toFixed(2)),
      runAt: new Date().toISOString(),
    };
  } finally {
    await stopServer(server);
    rmSync(dataDir, { recursive: true, force: true });
  }
}
