// `npm run analyze -- <file> [flags]`: runs the command-line analyzer as one bundled ES module
// (apps/analyzer/dist/analyze.mjs), built with esbuild when it is missing or older than its sources. A bundle
// starts in about a quarter of a second less than compiling the TypeScript on the fly with tsx, on every run.
// stdout is the analyzer's alone (build messages go to stderr); its exit code is this process's exit code.
import { mkdirSync, readdirSync, renameSync, statSync } from "node:fs";
import { createRequire } from "node:module";
import { spawnSync } from "node:child_process";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const entry = join(root, "apps", "analyzer", "src", "main.ts");
const bundle = join(root, "apps", "analyzer", "dist", "analyze.mjs");
// Everything the bundle is made of: the analyzer, the engine, the installed dependency versions, this script.
const sourceDirectories = [join(root, "apps", "analyzer", "src"), join(root, "packages", "seeing-stats", "src")];
const sourceFiles = [join(root, "pnpm-lock.yaml"), join(root, "apps", "analyzer", "package.json"), join(root, "packages", "seeing-stats", "package.json"), fileURLToPath(import.meta.url)];

function modifiedMs(path) {
  try {
    return statSync(path).mtimeMs;
  } catch {
    return Number.NaN;
  }
}

function newestSourceMs() {
  let newest = Math.max(...sourceFiles.map((path) => modifiedMs(path) || 0));
  const visit = (directory) => {
    for (const item of readdirSync(directory, { withFileTypes: true })) {
      const path = join(directory, item.name);
      if (item.isDirectory()) visit(path);
      else if (item.name.endsWith(".ts") && !item.name.endsWith(".test.ts")) newest = Math.max(newest, modifiedMs(path));
    }
  };
  sourceDirectories.forEach(visit);
  return newest;
}

/** esbuild comes with tsx (no dependency of its own); null when it cannot be found. */
function loadEsbuild() {
  try {
    const requireFromRoot = createRequire(join(root, "package.json"));
    return createRequire(requireFromRoot.resolve("tsx"))("esbuild");
  } catch {
    return null;
  }
}

function build(esbuild) {
  mkdirSync(dirname(bundle), { recursive: true });
  // Written beside the bundle and renamed into place, so a run at the same moment never reads half a file.
  const partial = `${bundle}.${process.pid}.tmp`;
  esbuild.buildSync({
    entryPoints: [entry],
    bundle: true,
    platform: "node",
    format: "esm",
    target: "node20",
    outfile: partial,
    logLevel: "warning", // esbuild logs to stderr
    // papaparse is CommonJS and asks for require(); give the bundle one
    banner: { js: "import { createRequire as createRequireForBundle } from 'node:module'; const require = createRequireForBundle(import.meta.url);" },
  });
  renameSync(partial, bundle);
}

const bundleMs = modifiedMs(bundle);
if (!(bundleMs >= newestSourceMs())) {
  const esbuild = loadEsbuild();
  if (esbuild === null) {
    // Still answer the user: run the sources through tsx, as before the bundle existed.
    process.stderr.write("calmcrest analyze: esbuild (installed with tsx) not found; running the TypeScript sources through tsx instead.\n");
    const result = spawnSync(join(root, "node_modules", ".bin", "tsx"), [entry, ...process.argv.slice(2)], { stdio: "inherit" });
    process.exit(result.status ?? 2);
  }
  process.stderr.write(Number.isNaN(bundleMs) ? "calmcrest analyze: building the analyzer bundle…\n" : "calmcrest analyze: sources changed, rebuilding the analyzer bundle…\n");
  build(esbuild);
}

// In this process: the analyzer reads process.argv.slice(2), which here are the user's arguments, and sets
// process.exitCode itself.
await import(pathToFileURL(bundle).href);
