// Shared between the web app and the server: request schemas (zod) and response types.
export * from "./auth";
export * from "./errors";
