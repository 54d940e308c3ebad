import type { ErrorRequestHandler, RequestHandler } from "express";
import type { ApiErrorBody } from "@calmcrest/contracts";
import { z } from "zod";

/** An error with an HTTP status and a message written for the person using the app. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string[]>,
  ) {
    super(message);
    this.name = "HttpError";
  }
}

export const notFound = (what = "That item") =>
  new HttpError(404, "not_found", `${what} does not exist, or your account has no access to it.`);

/** Narrows anything thrown into an Error, so no handler needs `catch (e: any)`. */
export function toError(thrown: unknown): Error {
  if (thrown instanceof Error) return thrown;
  return new Error(typeof thrown === "string" ? thrown : JSON.stringify(thrown));
}

export function validationError(error: z.ZodError, what = "The request"): HttpError {
  const fields: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "_";
    (fields[key] ??= []).push(issue.message);
  }
  const summary = Object.entries(fields)
    .map(([field, messages]) => `${field}: ${messages.join("; ")}`)
    .join(". ");
  return new HttpError(400, "invalid_input", `${what} has invalid fields. ${summary}`, fields);
}

/** Parses `value` with `schema` or throws a 400 naming every bad field. */
export function parseOr400<T>(schema: z.ZodType<T>, value: unknown, what?: string): T {
  const result = schema.safeParse(value);
  if (!result.success) throw validationError(result.error, what);
  return result.data;
}

export function errorBody(code: string, message: string, fields?: Record<string, string[]>): ApiErrorBody {
  return { error: fields ? { code, message, fields } : { code, message } };
}

export const apiNotFoundHandler: RequestHandler = (req, res) => {
  res.status(404).json(errorBody("not_found", `There is no API route ${req.method} ${req.originalUrl}. Check the address.`));
};

export const errorHandler: ErrorRequestHandler = (thrown, _req, res, _next) => {
  if (thrown instanceof HttpError) {
    res.status(thrown.status).json(errorBody(thrown.code, thrown.message, thrown.fields));
    return;
  }
  // Body parser errors carry a status (400 malformed JSON, 413 too large).
  const status = typeof thrown === "object" && thrown !== null && "status" in thrown ? Number(thrown.status) : 500;
  if (status === 400) {
    res.status(400).json(errorBody("malformed_body", "The request body is not valid JSON. Send a JSON object."));
    return;
  }
  if (status === 413) {
    res.status(413).json(errorBody("too_large", "The request body is too large."));
    return;
  }
  const error = toError(thrown);
  console.error(error);
  res.status(500).json(errorBody("server_error", "Something went wrong on the server. Try again; if it keeps failing, tell your administrator the time it happened."));
};
