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

const CUT_OFF = "The upload ended before its form did: the transfer was cut off or the request body is incomplete. Nothing was stored; send the file again.";
const BAD_PART_HEADER =
  "A part header of the upload form is malformed (for example a NUL or another control character in the file name). Nothing was stored; rename the file to plain letters, digits, dots and dashes and send it again.";

/** The multipart reader's (busboy's, through multer) errors: each is a fault of the request, not of the server. */
const MULTIPART_PROBLEMS = new Map<string, string>([
  ["Multipart: Boundary not found", "The request says multipart/form-data but names no boundary, so its parts cannot be found. Send the file as a multipart form (a browser or `curl -F file=@log.csv` does this); do not set the Content-Type header by hand."],
  ["Unexpected end of form", CUT_OFF],
  ["Unexpected end of file", CUT_OFF],
  ["Request aborted", CUT_OFF],
  ["Request closed", CUT_OFF],
  ["Malformed part header", BAD_PART_HEADER],
  ["Malformed content disposition", BAD_PART_HEADER],
  ["Malformed content type", "The request's Content-Type header is malformed. Send the file as a multipart form (field \"file\")."],
  ["Missing Content-Type", "The request has no Content-Type header. Send the file as a multipart form (field \"file\")."],
  ["Malformed urlencoded form", "The request's form body is malformed. Send the file as a multipart form (field \"file\")."],
]);

/** A 400 for an error of the multipart reader, or null when `thrown` is something else. */
export function multipartProblem(thrown: unknown): HttpError | null {
  if (!(thrown instanceof Error) || thrown instanceof HttpError) return null;
  const message = MULTIPART_PROBLEMS.get(thrown.message) ?? (thrown.message.startsWith("Unsupported content type:") ? "The request's Content-Type is not a form. Send the file as a multipart form (field \"file\")." : undefined);
  return message ? new HttpError(400, "bad_upload", message) : null;
}

export const errorHandler: ErrorRequestHandler = (thrown, _req, res, _next) => {
  const multipart = multipartProblem(thrown);
  if (multipart) {
    res.status(400).json(errorBody(multipart.code, multipart.message));
    return;
  }
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
