// Installs the workspace's dependencies when they are missing or the lockfile changed since the last install.
// Uses the pinned pnpm through npx, because a fresh machine has no global pnpm (see ../shared/STACK.md).
// Everything it prints goes to stderr, so `npm run --silent analyze -- --json` keeps stdout to one JSON document.
import { createHash } from "node:crypto";
import { existsSync, readFileSync, writeFileSync } from "node:fs";
import { spawnSync } from "node:child_process";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

export const PNPM = ["-y", "pnpm@12.4.2"];
const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const stampPath = join(root, "node_modules", ".calmcrest-install-stamp");

function lockHash() {
  const hash = createHash("sha256");
  for (const file of ["pnpm-lock.yaml", "pnpm-workspace.yaml"]) hash.update(readFileSync(join(root, file)));
  return hash.digest("hex");
}

export function ensureInstall({ quiet = false } = {}) {
  const wanted = lockHash();
  if (existsSync(stampPath) && readFileSync(stampPath, "utf8") === wanted) return;
  if (!quiet) console.error("Calmcrest: installing dependencies (first run on this machine can take about two minutes)…");
  const result = spawnSync("npx", [...PNPM, "install", "--frozen-lockfile"], {
    cwd: root,
    stdio: ["ignore", quiet ? "ignore" : process.stderr, "inherit"],
  });
  if (result.status !== 0) {
    console.error("Calmcrest: dependency install failed (see the pnpm output above). Check the network to the npm registry and try again.");
    process.exit(result.status ?? 1);
  }
  writeFileSync(stampPath, wanted);
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  ensureInstall({ quiet: process.argv.includes("--quiet") });
}
