// `npm start`: install what is missing, build the web app when its sources changed, then run the server
// (which migrates the database and seeds the demo scenario into an empty one). Serves http://localhost:4173.
import { spawn, spawnSync } from "node:child_process";
import { existsSync, readdirSync, statSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import { ensureInstall } from "./ensure-install.mjs";
import { serverCommand } from "./server-bundle.mjs";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");

function newestMtimeMs(path) {
  if (!existsSync(path)) return 0;
  const stat = statSync(path);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const entry of readdirSync(path)) {
    if (entry === "node_modules" || entry === "dist") continue;
    newest = Math.max(newest, newestMtimeMs(join(path, entry)));
  }
  return newest;
}

export function buildWebIfStale() {
  const built = join(root, "apps/web/dist/index.html");
  const sources = ["apps/web/src", "apps/web/index.html", "apps/web/public", "apps/web/vite.config.ts", "packages", "pnpm-lock.yaml"];
  const newestSource = Math.max(...sources.map((path) => newestMtimeMs(join(root, path))));
  if (existsSync(built) && statSync(built).mtimeMs >= newestSource) return;
  console.error("Calmcrest: building the web app…");
  const result = spawnSync(join(root, "apps/web/node_modules/.bin/vite"), ["build", "--logLevel", "warn"], { cwd: join(root, "apps/web"), stdio: "inherit" });
  if (result.status !== 0) {
    console.error("Calmcrest: the web app did not build (see the messages above).");
    process.exit(result.status ?? 1);
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  ensureInstall();
  buildWebIfStale();
  // The server runs from its esbuild bundles (scripts/server-bundle.mjs: less memory and a quicker start than tsx).
  const server = spawn(process.execPath, serverCommand().args, { cwd: root, stdio: "inherit" });
  for (const signal of ["SIGINT", "SIGTERM"]) process.on(signal, () => server.kill(signal));
  server.on("exit", (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
}
