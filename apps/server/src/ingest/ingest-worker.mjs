// Worker-thread entry of the ingest worker: its TypeScript code runs from a bundle (see ../worker-code.mjs).
import { runWorkerCode } from "../worker-code.mjs";

await runWorkerCode("ingest-worker", new URL("./ingest-worker.ts", import.meta.url));
