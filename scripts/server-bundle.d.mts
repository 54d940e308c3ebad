export declare const serverRoot: string;
export declare function ensureServerBundle(name: "main" | "summary-worker" | "ingest-worker"): string | null;
export declare function serverCommand(): { args: string[]; bundled: boolean };
