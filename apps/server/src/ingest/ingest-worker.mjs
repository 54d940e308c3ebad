// Worker-thread entry: the ingest code is TypeScript (like the rest of the server), so register tsx's loader first.
import { register } from "tsx/esm/api";

register();
await import("./ingest-worker.ts");
