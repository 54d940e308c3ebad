import { queryOptions } from "@tanstack/react-query";
import { exactMapping } from "@calmcrest/seeing-stats";
import type {
  ApiErrorBody,
  ColumnMappingInput,
  ReadOptionsInput,
  RereadAccepted,
  RereadUploadInput,
  RestoreUploadInput,
  UploadAccepted,
  UploadDuplicateBody,
  UploadPreview,
  UploadStatus,
  WholeFileCheck,
  WithdrawUploadInput,
} from "@calmcrest/contracts";
import { ApiError, api } from "./client";
import { uploadKeys } from "./query-keys";

export const uploadQuery = (uploadId: number) =>
  queryOptions({
    queryKey: uploadKeys.detail(uploadId),
    queryFn: () => api<UploadStatus>(`/uploads/${uploadId}`),
    // Poll while the server is still working on it; stop once it has an outcome.
    refetchInterval: (query) => (query.state.data && (query.state.data.status === "queued" || query.state.data.status === "ingesting") ? 500 : false),
    staleTime: 0,
  });

/** Server-side reading of the first rows with the mapping; nothing is stored. */
export function previewUpload(campaignId: number, head: Blob, fileName: string, mapping: ColumnMappingInput, readOptions?: ReadOptionsInput) {
  const form = new FormData();
  // Every field, unmapped ones as null: the server reads exactly the mapping the person checked.
  form.append("mapping", JSON.stringify(exactMapping(mapping)));
  if (readOptions) form.append("readOptions", JSON.stringify(readOptions));
  form.append("file", head, fileName);
  return api<UploadPreview>(`/campaigns/${campaignId}/uploads/preview`, { form });
}

export type UploadOutcome = { kind: "accepted"; accepted: UploadAccepted } | { kind: "duplicate"; duplicate: UploadDuplicateBody };

const isDuplicate = (value: unknown): value is UploadDuplicateBody =>
  typeof value === "object" && value !== null && "upload" in value && (value as UploadDuplicateBody).error?.code === "duplicate_upload";

/**
 * Posts a log file with its mapping (the mapping first, so a server reading as the bytes arrive has it) through
 * XMLHttpRequest, because fetch cannot report upload progress. `onProgress` gets the fraction 0..1 of bytes sent;
 * `activity` names the action in the messages ("upload", "check"). Resolves with the status and parsed JSON body.
 */
function postLogFile(
  url: string,
  activity: string,
  file: File,
  mapping: ColumnMappingInput,
  onProgress: (fraction: number) => void,
  signal?: AbortSignal,
  readOptions?: ReadOptionsInput,
  storeAnyway?: boolean,
): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve, reject) => {
    const request = new XMLHttpRequest();
    request.open("POST", url);
    request.setRequestHeader("Accept", "application/json");
    request.withCredentials = true;
    request.upload.onprogress = (event) => {
      if (event.lengthComputable && event.total > 0) onProgress(event.loaded / event.total);
    };
    request.onerror = () => reject(new ApiError(0, "network", `The connection broke during the ${activity}. Check the network and try again; nothing half-sent is kept.`));
    request.onabort = () => reject(new DOMException(`The ${activity} was cancelled.`, "AbortError"));
    request.onload = () => {
      let body: unknown = undefined;
      try {
        body = request.responseText ? JSON.parse(request.responseText) : undefined;
      } catch {
        body = undefined;
      }
      resolve({ status: request.status, body });
    };
    signal?.addEventListener("abort", () => request.abort());
    const form = new FormData();
    form.append("mapping", JSON.stringify(exactMapping(mapping)));
    if (readOptions) form.append("readOptions", JSON.stringify(readOptions));
    if (storeAnyway) form.append("storeAnyway", "true");
    form.append("file", file, file.name);
    request.send(form);
  });
}

/** The ApiError for an answer that is not the expected outcome. */
function answerError(status: number, body: unknown): ApiError {
  const error = (body as ApiErrorBody | undefined)?.error;
  return new ApiError(status, error?.code ?? "http_error", error?.message ?? `The server answered ${status}. Try again.`, error?.fields, body);
}

/**
 * Sends a whole log for storing, with progress. A 409 for a file already in the campaign is an outcome, not an error.
 * `storeAnyway` is the person's confirmation to keep a file none of whose rows can be used (else the server answers 422).
 */
export async function sendUpload(
  campaignId: number,
  file: File,
  mapping: ColumnMappingInput,
  onProgress: (fraction: number) => void,
  signal?: AbortSignal,
  readOptions?: ReadOptionsInput,
  storeAnyway?: boolean,
): Promise<UploadOutcome> {
  const { status, body } = await postLogFile(`/api/campaigns/${campaignId}/uploads`, "upload", file, mapping, onProgress, signal, readOptions, storeAnyway);
  if (status === 202) {
    onProgress(1);
    return { kind: "accepted", accepted: body as UploadAccepted };
  }
  if (status === 409 && isDuplicate(body)) return { kind: "duplicate", duplicate: body };
  throw answerError(status, body);
}

/** Takes an upload's samples out of every statistic (lead, or the engineer who sent it); the raw file stays. */
export const withdrawUpload = (uploadId: number, input: WithdrawUploadInput) => api<UploadStatus>(`/uploads/${uploadId}/withdraw`, { body: input });

/** Puts a withdrawn upload's samples back. */
export const restoreUpload = (uploadId: number, input: RestoreUploadInput) => api<UploadStatus>(`/uploads/${uploadId}/restore`, { body: input });

/** Reads the stored raw file again with a corrected mapping or monitor; the old upload is withdrawn in the same step. */
export const rereadUpload = (uploadId: number, input: Omit<RereadUploadInput, "mapping"> & { mapping: ColumnMappingInput }) =>
  // Every field is sent (exactMapping), so the server reads the file with exactly the mapping that was checked.
  api<RereadAccepted>(`/uploads/${uploadId}/reread`, { body: { ...input, mapping: exactMapping(input.mapping) } });

/** Where the stored raw file of an upload is downloaded. */
export const rawFileUrl = (uploadId: number) => `/api/uploads/${uploadId}/raw`;

/** The opening bytes of an upload's stored raw file (for the re-read's mapping), without fetching the rest. */
export async function rawFileHead(uploadId: number, maxBytes: number): Promise<string> {
  const response = await fetch(rawFileUrl(uploadId), { credentials: "same-origin" });
  if (!response.ok || !response.body) throw new ApiError(response.status, "http_error", "The stored raw file could not be read. Try again.");
  const reader = response.body.getReader();
  const chunks: Uint8Array[] = [];
  let received = 0;
  while (received < maxBytes) {
    const { done, value } = await reader.read();
    if (done) break;
    chunks.push(value);
    received += value.length;
  }
  await reader.cancel().catch(() => undefined);
  const bytes = new Uint8Array(Math.min(received, maxBytes));
  let offset = 0;
  for (const chunk of chunks) {
    const part = chunk.subarray(0, Math.max(0, bytes.length - offset));
    bytes.set(part, offset);
    offset += part.length;
  }
  return new TextDecoder().decode(bytes);
}

/**
 * Sends a whole log to the server's check (nothing is stored), with progress: the server reads the rows as the
 * bytes arrive, so the fraction sent is also the fraction checked.
 */
export async function checkWholeFile(
  campaignId: number,
  file: File,
  mapping: ColumnMappingInput,
  onProgress: (fraction: number) => void,
  signal?: AbortSignal,
  readOptions?: ReadOptionsInput,
): Promise<WholeFileCheck> {
  const { status, body } = await postLogFile(`/api/campaigns/${campaignId}/uploads/check`, "check", file, mapping, onProgress, signal, readOptions);
  if (status === 200) return body as WholeFileCheck;
  throw answerError(status, body);
}
