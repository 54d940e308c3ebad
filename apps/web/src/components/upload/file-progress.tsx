import { useEffect, useRef } from "react";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import type { UploadDuplicateBody, UploadListItem, WholeFileCheck } from "@calmcrest/contracts";
import { uploadQuery } from "../../api/uploads";
import { formatNumber } from "../../lib/format";
import { RereadOffer } from "./reread";
import { setAsideSentence } from "./whole-file-check";
import { campaignKeys, siteKeys } from "../../api/query-keys";
import { Reason } from "../reason";

export type FileSend =
  | { state: "waiting" }
  | { state: "sending"; fraction: number }
  /** `storedAnyway`: the server's sentence when it kept a file with no usable row on the person's "store it anyway". */
  | { state: "stored"; uploadId: number; storedAnyway?: string | null }
  | { state: "duplicate"; message: string; upload: UploadListItem; rereadOffer: UploadDuplicateBody["rereadOffer"] }
  | { state: "refused"; message: string }
  /** Stopped by the person during the transfer; `sentInFull` when every byte had already left. */
  | { state: "cancelled"; sentInFull: boolean }
  /** Left out because an earlier file of the batch was cancelled. */
  | { state: "not-sent" };

function Bar({ label, fraction, tone = "accent" }: { label: string; fraction: number; tone?: "accent" | "bad" }) {
  const percent = Math.round(Math.min(1, Math.max(0, fraction)) * 100);
  return (
    <div className="text-sm">
      <div className="flex justify-between">
        <span>{label}</span>
        <span className="tabular-nums">{percent} %</span>
      </div>
      <div role="progressbar" aria-label={label} aria-valuemin={0} aria-valuemax={100} aria-valuenow={percent} className="mt-1 h-2.5 overflow-hidden rounded-full bg-line">
        <div className={`h-full ${tone === "bad" ? "bg-bad" : "bg-accent"} transition-[width]`} style={{ width: `${percent}%` }} />
      </div>
    </div>
  );
}

function Counts({ upload, check }: { upload: UploadListItem; check?: WholeFileCheck | undefined }) {
  const reasons = Object.entries(upload.samples.rejectedByReason).filter(([, count]) => (count ?? 0) > 0);
  return (
    <div className="space-y-1 text-sm" data-testid="upload-result">
      <p>
        <span className="font-semibold" data-testid="accepted-count">
          {formatNumber(upload.samples.accepted)} accepted
        </span>
        {" · "}
        <span className="font-semibold" data-testid="rejected-count">
          {formatNumber(upload.samples.rejected)} rejected
        </span>
        {" · "}
        {formatNumber(upload.samples.read)} rows read
      </p>
      {upload.readOptions.headerLine !== undefined && upload.readOptions.headerLine > 1 ? (
        <p className="text-ink-soft" data-testid="result-preamble">
          {upload.readOptions.headerLine === 2 ? "Line 1" : `Lines 1–${upload.readOptions.headerLine - 1}`} above the column names on line {upload.readOptions.headerLine}: skipped as a preamble, not rows.
        </p>
      ) : null}
      {check && check.usable === upload.samples.accepted ? <p className="text-ink-soft" data-testid="result-set-aside">{setAsideSentence(check, `the ${formatNumber(upload.samples.accepted)} accepted`)}</p> : null}
      {upload.warnings.map((warning) => (
        <p key={warning.code} role="note" className="rounded bg-warn-pale px-2 py-1 text-warn">
          <span className="font-semibold">Warning:</span> {warning.message}
        </p>
      ))}
      {reasons.length > 0 ? (
        <ul className="text-ink-soft" aria-label="Rejected by reason">
          {reasons.map(([reason, count]) => (
            <li key={reason}>
              {formatNumber(count)} <Reason reason={reason} />
            </li>
          ))}
        </ul>
      ) : null}
      {upload.samples.rejected > 0 ? (
        <a href={`/api/uploads/${upload.id}/rejected.csv`} download className="inline-block font-semibold text-accent underline">
          Download the rejected rows (CSV, with line numbers and reasons)
        </a>
      ) : null}
    </div>
  );
}

function Ingest({ uploadId, onFinished, check }: { uploadId: number; onFinished: () => void; check?: WholeFileCheck | undefined }) {
  const status = useQuery(uploadQuery(uploadId));
  const queryClient = useQueryClient();
  const reported = useRef(false);
  const finished = status.data && status.data.status !== "queued" && status.data.status !== "ingesting";
  useEffect(() => {
    if (!finished || reported.current || !status.data) return;
    reported.current = true;
    // New samples change the campaign, its site, the site list and the campaign list's sample counts.
    void Promise.all([
      queryClient.invalidateQueries({ queryKey: campaignKeys.detail(status.data.campaignId) }),
      queryClient.invalidateQueries({ queryKey: campaignKeys.list() }),
      queryClient.invalidateQueries({ queryKey: siteKeys.all }),
    ]).then(onFinished);
  }, [finished, status.data, queryClient, onFinished]);

  if (status.isError) return <p className="text-sm text-bad">The upload's status could not be read: {status.error.message}</p>;
  if (!status.data) return <Bar label="Reading into the database" fraction={0} />;
  const upload = status.data;
  if (upload.status === "queued") return <Bar label="Waiting for the server to start reading" fraction={0} />;
  if (upload.status === "ingesting") return <Bar label="Reading into the database" fraction={upload.progress} />;
  if (upload.status === "failed" || upload.status === "interrupted")
    return (
      <div className="space-y-1 text-sm">
        <Bar label="Reading into the database" fraction={upload.progress} tone="bad" />
        <p role="alert" className="text-bad">
          {upload.status === "failed" ? "The file could not be read into the database; none of its samples were kept." : "The server stopped while reading this file; none of its samples were kept."} {upload.error}
        </p>
      </div>
    );
  return (
    <div className="space-y-2">
      <Bar label="Reading into the database" fraction={1} />
      <Counts upload={upload} check={check} />
    </div>
  );
}

/** One file's way through the upload: transfer bar (with Cancel), ingest bar, then its result. */
export function FileProgress({
  file,
  send,
  campaignId,
  onFinished,
  onCancel,
  check,
}: {
  file: File;
  send: FileSend;
  campaignId: number;
  onFinished: () => void;
  onCancel: () => void;
  /** The whole-file check made before the upload, to explain the filters the statistics apply later. */
  check?: WholeFileCheck | undefined;
}) {
  return (
    <li className="space-y-2 rounded-lg border border-line bg-panel p-3">
      <p className="font-semibold">{file.name}</p>
      {send.state === "waiting" ? <p className="text-sm text-ink-soft">Waiting for the files before it.</p> : null}
      {send.state === "sending" ? (
        <div className="flex items-end gap-3">
          <div className="min-w-0 flex-1">
            <Bar label="Sending to the server" fraction={send.fraction} />
          </div>
          <button type="button" onClick={onCancel} aria-label={`Cancel sending ${file.name}`} className="rounded-md border border-line px-3 py-1 text-sm font-semibold hover:bg-bad-pale">
            Cancel
          </button>
        </div>
      ) : null}
      {send.state === "cancelled" ? (
        <p role="status" className="rounded-md bg-warn-pale px-3 py-2 text-sm text-warn">
          {send.sentInFull
            ? "Cancelled after the whole file had been sent: the server may have stored it. Check the campaign's uploads before sending it again."
            : "Cancelled during the transfer: the file was not stored. Nothing of it is kept on the server."}
        </p>
      ) : null}
      {send.state === "not-sent" ? <p className="text-sm text-ink-soft">Not sent: the upload was cancelled before this file.</p> : null}
      {send.state === "stored" ? (
        <>
          <Bar label="Sending to the server" fraction={1} />
          {send.storedAnyway ? (
            <p role="note" className="rounded-md bg-warn-pale px-3 py-2 text-sm text-warn" data-testid="stored-anyway">
              {send.storedAnyway}
            </p>
          ) : null}
          <Ingest uploadId={send.uploadId} onFinished={onFinished} check={check} />
        </>
      ) : null}
      {send.state === "duplicate" ? (
        <div className="space-y-1 text-sm">
          <p role="status" className="rounded-md bg-warn-pale px-3 py-2 text-warn">
            {send.message}
          </p>
          <Counts upload={send.upload} />
          {send.rereadOffer ? <RereadOffer before={send.upload} mapping={send.rereadOffer.mapping} /> : null}
          <Link to={`/campaigns/${campaignId}`} className="font-semibold text-accent underline">
            See it in the campaign
          </Link>
        </div>
      ) : null}
      {send.state === "refused" ? (
        <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
          {send.message}
        </p>
      ) : null}
    </li>
  );
}
