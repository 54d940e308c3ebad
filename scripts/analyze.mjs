// `npm run analyze -- <file> [flags]`: runs the command-line analyzer as one bundled ES module
// (apps/analyzer/dist/analyze.mjs), built with esbuild when it is missing or older than its sources. A bundle
// starts in about a quarter of a second less than compiling the TypeScript on the fly with tsx, on every run.
// stdout is the analyzer's alone (build messages go to stderr); its exit code is this process's exit code.
import { spawnSync } from "node:child_process";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { ensureBundle, repositoryRoot as root } from "./esm-bundle.mjs";

const entry = join(root, "apps", "analyzer", "src", "main.ts");
const bundle = join(root, "apps", "analyzer", "dist", "analyze.mjs");

const outcome = ensureBundle({
  entry,
  bundle,
  // Everything the bundle is made of: the analyzer, the engine, the installed dependency versions, this script.
  sourceDirectories: [join(root, "apps", "analyzer", "src"), join(root, "packages", "seeing-stats", "src")],
  sourceFiles: [join(root, "pnpm-lock.yaml"), join(root, "apps", "analyzer", "package.json"), join(root, "packages", "seeing-stats", "package.json"), fileURLToPath(import.meta.url)],
  onBuild: (why) => process.stderr.write(why === "missing" ? "calmcrest analyze: building the analyzer bundle…\n" : "calmcrest analyze: sources changed, rebuilding the analyzer bundle…\n"),
});
if (outcome === "unavailable") {
  // Still answer the user: run the sources through tsx, as before the bundle existed.
  process.stderr.write("calmcrest analyze: esbuild (installed with tsx) not found; running the TypeScript sources through tsx instead.\n");
  const result = spawnSync(join(root, "node_modules", ".bin", "tsx"), [entry, ...process.argv.slice(2)], { stdio: "inherit" });
  process.exit(result.status ?? 2);
}

// In this process: the analyzer reads process.argv.slice(2), which here are the user's arguments, and sets
// process.exitCode itself.
await import(pathToFileURL(bundle).href);
