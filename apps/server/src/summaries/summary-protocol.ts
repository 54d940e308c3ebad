import type { SummaryTaskInputs, SummaryTaskKind } from "./tasks.server";

// Messages between the summary service (main thread) and a summary worker thread.

export interface SummaryWorkerOptions {
  dbFile: string;
  /** The bound of the worker's sample-column cache in bytes (SampleCache maxBytes). */
  columnCacheMaxBytes: number;
}

export type ToSummaryWorker = { type: "task"; id: number; kind: SummaryTaskKind; input: SummaryTaskInputs[SummaryTaskKind] } | { type: "close" };

export type FromSummaryWorker =
  | {
      type: "result";
      id: number;
      /** The answer as UTF-8 JSON (serialised and encoded once, in the worker), or a typed array's bytes; its buffer is transferred, not copied. */
      body: Uint8Array;
      /** The data version of each campaign the answer was computed from, in the task's campaign order. */
      versions: number[];
      computeMs: number;
      /** Bytes of sample columns the worker holds after the task. */
      columnBytes: number;
    }
  | { type: "error"; id: number; message: string }
  /** Sent once, when the worker has loaded its code and opened its connection. */
  | { type: "ready" };
