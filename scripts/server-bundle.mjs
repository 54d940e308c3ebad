// The server as it runs for `npm start` and the benchmarks: its main thread and its two kinds of worker thread, each one
// esbuild bundle in apps/server/dist/ (main.mjs, summary-worker.mjs, ingest-worker.mjs), rebuilt when older than any
// non-test `.ts` of the server or the shared packages. Measured on an empty data directory: the idle server holds 167 MB
// from the bundles against 230 MB through tsx, which compiles the TypeScript in the process and keeps it.
// Native and dynamically loading packages stay outside the bundles and load from apps/server's own dependencies.
import { readdirSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { ensureBundle, repositoryRoot } from "./esm-bundle.mjs";

export const serverRoot = join(repositoryRoot, "apps", "server");
const packagesDir = join(repositoryRoot, "packages");

const ENTRIES = {
  main: { source: "src/main.ts", external: ["better-sqlite3", "knex", "@node-rs/argon2"] },
  "summary-worker": { source: "src/summaries/summary-worker.ts", external: ["better-sqlite3"] },
  "ingest-worker": { source: "src/ingest/ingest-worker.ts", external: ["better-sqlite3"] },
};

/** Builds bundle `name` of the server when missing or stale; returns its path, or null when esbuild is missing. */
export function ensureServerBundle(name) {
  const entry = ENTRIES[name];
  const packageNames = readdirSync(packagesDir);
  const bundle = join(serverRoot, "dist", `${name}.mjs`);
  const outcome = ensureBundle({
    entry: join(serverRoot, entry.source),
    bundle,
    sourceDirectories: [join(serverRoot, "src"), ...packageNames.map((packageName) => join(packagesDir, packageName, "src"))],
    sourceFiles: [join(repositoryRoot, "pnpm-lock.yaml"), join(serverRoot, "package.json"), ...packageNames.map((packageName) => join(packagesDir, packageName, "package.json")), fileURLToPath(import.meta.url)],
    external: entry.external,
  });
  return outcome === "unavailable" ? null : bundle;
}

/**
 * The command that runs the server from its bundles (all three made fresh first; the main bundle finds its workers
 * beside itself in dist/), or through tsx when esbuild cannot be found.
 */
export function serverCommand() {
  const bundles = Object.keys(ENTRIES).map(ensureServerBundle);
  if (bundles.every((bundle) => bundle !== null)) return { args: [join(serverRoot, "dist", "main.mjs")], bundled: true };
  return { args: ["--import", "tsx", join(serverRoot, "src", "main.ts")], bundled: false };
}
