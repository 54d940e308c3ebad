import { queryOptions } from "@tanstack/react-query";
import { exactMapping } from "@calmcrest/seeing-stats";
import type { ApiErrorBody, ColumnMappingInput, UploadAccepted, UploadDuplicateBody, UploadPreview, UploadStatus } from "@calmcrest/contracts";
import { ApiError, api } from "./client";

export const uploadQuery = (uploadId: number) =>
  queryOptions({
    queryKey: ["uploads", "detail", uploadId],
    queryFn: () => api<UploadStatus>(`/uploads/${uploadId}`),
    // Poll while the server is still working on it; stop once it has an outcome.
    refetchInterval: (query) => (query.state.data && (query.state.data.status === "queued" || query.state.data.status === "ingesting") ? 500 : false),
    staleTime: 0,
  });

/** Server-side reading of the first rows with the mapping; nothing is stored. */
export function previewUpload(campaignId: number, head: Blob, fileName: string, mapping: ColumnMappingInput) {
  const form = new FormData();
  // Every field, unmapped ones as null: the server reads exactly the mapping the person checked.
  form.append("mapping", JSON.stringify(exactMapping(mapping)));
  form.append("file", head, fileName);
  return api<UploadPreview>(`/campaigns/${campaignId}/uploads/preview`, { form });
}

export type UploadOutcome = { kind: "accepted"; accepted: UploadAccepted } | { kind: "duplicate"; duplicate: UploadDuplicateBody };

const isDuplicate = (value: unknown): value is UploadDuplicateBody =>
  typeof value === "object" && value !== null && "upload" in value && (value as UploadDuplicateBody).error?.code === "duplicate_upload";

/**
 * Sends a whole log with XMLHttpRequest, because fetch cannot report upload progress. `onProgress` gets the
 * fraction 0..1 of bytes sent. A 409 for a file already in the campaign is an outcome, not an error.
 */
export function sendUpload(campaignId: number, file: File, mapping: ColumnMappingInput, onProgress: (fraction: number) => void, signal?: AbortSignal): Promise<UploadOutcome> {
  return new Promise((resolve, reject) => {
    const request = new XMLHttpRequest();
    request.open("POST", `/api/campaigns/${campaignId}/uploads`);
    request.setRequestHeader("Accept", "application/json");
    request.withCredentials = true;
    request.upload.onprogress = (event) => {
      if (event.lengthComputable && event.total > 0) onProgress(event.loaded / event.total);
    };
    request.onerror = () => reject(new ApiError(0, "network", "The connection broke during the upload. Check the network and upload the file again; nothing half-sent is kept."));
    request.onabort = () => reject(new DOMException("The upload was cancelled.", "AbortError"));
    request.onload = () => {
      let body: unknown = undefined;
      try {
        body = request.responseText ? JSON.parse(request.responseText) : undefined;
      } catch {
        body = undefined;
      }
      if (request.status === 202) {
        onProgress(1);
        resolve({ kind: "accepted", accepted: body as UploadAccepted });
      } else if (request.status === 409 && isDuplicate(body)) {
        resolve({ kind: "duplicate", duplicate: body });
      } else {
        const error = (body as ApiErrorBody | undefined)?.error;
        reject(new ApiError(request.status, error?.code ?? "http_error", error?.message ?? `The server answered ${request.status}. Try again.`, error?.fields, body));
      }
    };
    signal?.addEventListener("abort", () => request.abort());
    const form = new FormData();
    form.append("mapping", JSON.stringify(exactMapping(mapping)));
    form.append("file", file, file.name);
    request.send(form);
  });
}
