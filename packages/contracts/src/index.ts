// Shared between the web app and the server: request schemas (zod) and response types.
export * from "./auth";
export * from "./errors";
export * from "./sites";
export * from "./campaigns";
export * from "./uploads";
export * from "./summaries";
export * from "./users";
export * from "./samples";
export * from "./config";
export * from "./csv";
export * from "./comparisons";
export * from "./outbox";
export * from "./markdown";
export * from "./reports";
export * from "./audit";
export * from "./passwords";
