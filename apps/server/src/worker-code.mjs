// The code of a server worker thread (summaries, ingest). The server's code is TypeScript; a worker that compiled it
// on the fly through tsx's loader would carry a loader thread and the compiler with it: about 80 MB and a slower start
// per worker, measured with two summary workers (203 MB against 90 MB for the process). So each worker runs one
// esbuild bundle of its code (apps/server/dist/<name>.mjs), built by the first worker that finds it missing or older
// than its sources; tsx only when esbuild cannot be found or CALMCREST_WORKER_BUNDLE=off.
import { readdirSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { ensureBundle, repositoryRoot } from "../../../scripts/esm-bundle.mjs";

const serverRoot = join(repositoryRoot, "apps", "server");

/** Runs `source` (a TypeScript worker entry) in this worker thread, from its bundle `name` when it can. */
export async function runWorkerCode(name, source) {
  if (process.env.CALMCREST_WORKER_BUNDLE !== "off") {
    const packages = join(repositoryRoot, "packages");
    const packageNames = readdirSync(packages);
    const bundle = join(serverRoot, "dist", `${name}.mjs`);
    const outcome = ensureBundle({
      entry: fileURLToPath(source),
      bundle,
      sourceDirectories: [join(serverRoot, "src"), ...packageNames.map((name) => join(packages, name, "src"))],
      sourceFiles: [join(repositoryRoot, "pnpm-lock.yaml"), join(serverRoot, "package.json"), ...packageNames.map((name) => join(packages, name, "package.json")), fileURLToPath(import.meta.url)],
      // A native module: loaded from apps/server's own dependencies, beside the bundle's folder.
      external: ["better-sqlite3"],
    });
    if (outcome !== "unavailable") {
      await import(pathToFileURL(bundle).href);
      return;
    }
  }
  const { register } = await import("tsx/esm/api");
  register();
  await import(source.href);
}
