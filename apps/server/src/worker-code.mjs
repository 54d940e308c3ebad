// The code of a server worker thread (summaries, ingest) when the server runs from its TypeScript sources (tests, tsx):
// a worker that compiled its code on the fly through tsx's loader would carry a loader thread and the compiler with it
// (about 80 MB more for two summary workers, measured), so it runs the esbuild bundle of its code
// (apps/server/dist/<name>.mjs, scripts/server-bundle.mjs), built by the first worker that finds it missing or older
// than its sources; tsx only when esbuild cannot be found or CALMCREST_WORKER_BUNDLE=off. A server run from its own
// bundle (npm start) starts the worker bundles in dist/ directly.
import { pathToFileURL } from "node:url";
import { ensureServerBundle } from "../../../scripts/server-bundle.mjs";

/** Runs `source` (a TypeScript worker entry) in this worker thread, from its bundle `name` when it can. */
export async function runWorkerCode(name, source) {
  const bundle = process.env.CALMCREST_WORKER_BUNDLE === "off" ? null : ensureServerBundle(name);
  if (bundle !== null) {
    await import(pathToFileURL(bundle).href);
    return;
  }
  const { register } = await import("tsx/esm/api");
  register();
  await import(source.href);
}
