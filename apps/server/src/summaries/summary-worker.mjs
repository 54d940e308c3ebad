// Worker-thread entry of the summary worker: its TypeScript code runs from a bundle (see ../worker-code.mjs).
import { runWorkerCode } from "../worker-code.mjs";

await runWorkerCode("summary-worker", new URL("./summary-worker.ts", import.meta.url));
