// Worker-thread entry: the summary code is TypeScript (like the rest of the server), so register tsx's loader first.
import { register } from "tsx/esm/api";

register();
await import("./summary-worker.ts");
