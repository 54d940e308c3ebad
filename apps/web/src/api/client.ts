import type { ApiErrorBody } from "@calmcrest/contracts";

/** An API answer that is not 2xx, with the server's message for a person. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fields?: Record<string, string[]>,
    readonly body?: unknown,
  ) {
    super(message);
    this.name = "ApiError";
  }
}

function isErrorBody(value: unknown): value is ApiErrorBody {
  return typeof value === "object" && value !== null && "error" in value && typeof (value as ApiErrorBody).error?.message === "string";
}

/** fetch for the JSON API: same-origin cookies, JSON bodies, errors thrown as ApiError. */
export async function api<T>(path: string, init: { method?: string; body?: unknown; form?: FormData; signal?: AbortSignal } = {}): Promise<T> {
  const headers: Record<string, string> = { Accept: "application/json" };
  let body: BodyInit | undefined;
  if (init.form) body = init.form;
  else if (init.body !== undefined) {
    headers["Content-Type"] = "application/json";
    body = JSON.stringify(init.body);
  }
  let response: Response;
  try {
    response = await fetch(`/api${path}`, { method: init.method ?? (body ? "POST" : "GET"), headers, body, credentials: "same-origin", signal: init.signal });
  } catch (thrown) {
    if (thrown instanceof DOMException && thrown.name === "AbortError") throw thrown;
    throw new ApiError(0, "network", "Calmcrest's server cannot be reached. Check your connection, or whether the server is running, and try again.");
  }
  const text = await response.text();
  let parsed: unknown = undefined;
  if (text) {
    try {
      parsed = JSON.parse(text);
    } catch {
      parsed = undefined;
    }
  }
  if (!response.ok) {
    if (isErrorBody(parsed)) throw new ApiError(response.status, parsed.error.code, parsed.error.message, parsed.error.fields, parsed);
    throw new ApiError(response.status, "http_error", `The server answered ${response.status} ${response.statusText}. Try again.`);
  }
  return parsed as T;
}
