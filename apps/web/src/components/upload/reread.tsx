import { createContext, useContext, useEffect, useId, useRef, useState, type ReactNode } from "react";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import type { CampaignDetail, ColumnMappingInput, Me, UploadListItem } from "@calmcrest/contracts";
import type { ColumnMapping } from "@calmcrest/seeing-stats";
import { ApiError } from "../../api/client";
import { uploadChanged, useChangeUpload, type UploadChange } from "../../api/mutations";
import { uploadKeys } from "../../api/query-keys";
import { rawFileHead, rawFileUrl, rereadUpload, uploadQuery } from "../../api/uploads";
import { formatDateTimeUtc, formatNumber } from "../../lib/format";
import { HEAD_BYTES, readLogHead } from "../../lib/log-head";
import { MappingEditor, mappingProblems } from "./mapping-editor";
import { Reason } from "../reason";

// Withdraw, restore and re-read of a stored upload, and the before/after counts of a re-read.

/** Whether this person may withdraw, restore or re-read the upload: a survey lead, or the engineer who sent it. */
export function mayChangeUpload(me: Me | null | undefined, campaign: Pick<CampaignDetail, "can">, upload: UploadListItem): boolean {
  if (!me || !campaign.can.upload) return false;
  return me.role === "lead" || upload.uploadedBy.id === me.id;
}

const settled = (upload: UploadListItem) => upload.status !== "queued" && upload.status !== "ingesting";

/** Opens the re-read panel of the campaign page for one upload. */
export const RereadRequest = createContext<(upload: UploadListItem) => void>(() => undefined);

/** What has happened to an upload beyond its status: withdrawn (who, when, why), re-read of / replaced by. */
export function UploadHistoryNote({ upload }: { upload: UploadListItem }) {
  return (
    <>
      {upload.withdrawn ? (
        <span className="mt-1 block max-w-64 rounded bg-paper px-1.5 py-0.5 text-xs text-ink-soft" data-testid={`withdrawn-${upload.id}`}>
          <span className="font-semibold text-ink">Withdrawn</span> by {upload.withdrawn.by.name}, {formatDateTimeUtc(upload.withdrawn.at)}: {upload.withdrawn.reason}. Its samples are in no statistic; the file is kept.
        </span>
      ) : null}
      {upload.replacesUploadId !== null ? <span className="mt-1 block text-xs text-ink-soft">Re-read of upload #{upload.replacesUploadId}</span> : null}
      {upload.replacedByUploadId !== null ? <span className="mt-1 block text-xs text-ink-soft">Replaced by upload #{upload.replacedByUploadId}</span> : null}
      {upload.monitorOverride ? (
        <span className="mt-1 block text-xs text-ink-soft">
          Read with corrected monitor: {upload.monitorOverride.apertureMm} mm, {upload.monitorOverride.baselineMm} mm, {upload.monitorOverride.wavelengthNm} nm
        </span>
      ) : null}
    </>
  );
}

/** The upload table's actions: the stored raw file, and for those who may: withdraw, restore, re-read. */
export function UploadActions({ upload, campaign, me }: { upload: UploadListItem; campaign: CampaignDetail; me: Me | null | undefined }) {
  const changeUpload = useChangeUpload(upload.campaignId);
  const openReread = useContext(RereadRequest);
  const [withdrawing, setWithdrawing] = useState(false);
  const [reason, setReason] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const reasonId = useId();
  const may = mayChangeUpload(me, campaign, upload) && settled(upload);

  const run = async (change: UploadChange) => {
    setProblem(null);
    setBusy(true);
    try {
      await changeUpload.mutateAsync(change);
      setWithdrawing(false);
      setReason("");
    } catch (error) {
      setProblem(error instanceof ApiError ? error.message : "That did not work. Try again.");
    } finally {
      setBusy(false);
    }
  };

  return (
    <span className="flex flex-col items-start gap-1 text-xs">
      <a href={rawFileUrl(upload.id)} download className="font-semibold text-accent underline">
        Original file
      </a>
      {may && !upload.withdrawn && !withdrawing ? (
        <button type="button" onClick={() => setWithdrawing(true)} className="rounded border border-line px-2 py-0.5 font-semibold hover:bg-bad-pale" aria-label={`Withdraw upload #${upload.id} (${upload.fileName})`}>
          Withdraw…
        </button>
      ) : null}
      {may && withdrawing ? (
        <form
          className="w-56 space-y-1 rounded border border-line bg-paper p-2"
          onSubmit={(event) => {
            event.preventDefault();
            void run({ kind: "withdraw", uploadId: upload.id, reason });
          }}
        >
          <label htmlFor={reasonId} className="block font-semibold">
            Why withdraw it? (kept in the audit log)
          </label>
          <textarea id={reasonId} value={reason} onChange={(event) => setReason(event.target.value)} rows={2} className="w-full rounded border border-line bg-panel px-1.5 py-1" required minLength={3} />
          <span className="flex gap-2">
            <button type="submit" disabled={busy || reason.trim().length < 3} className="rounded bg-bad px-2 py-0.5 font-semibold text-white disabled:opacity-50">
              Withdraw
            </button>
            <button type="button" onClick={() => setWithdrawing(false)} className="rounded border border-line px-2 py-0.5">
              Cancel
            </button>
          </span>
        </form>
      ) : null}
      {may && upload.withdrawn ? (
        <button type="button" disabled={busy} onClick={() => void run({ kind: "restore", uploadId: upload.id })} className="rounded border border-line px-2 py-0.5 font-semibold hover:bg-accent-pale" aria-label={`Restore upload #${upload.id} (${upload.fileName})`}>
          Restore
        </button>
      ) : null}
      {may && upload.replacedByUploadId === null ? (
        <button type="button" onClick={() => openReread(upload)} className="rounded border border-line px-2 py-0.5 font-semibold hover:bg-accent-pale" aria-label={`Re-read upload #${upload.id} (${upload.fileName}) with a corrected mapping`}>
          Re-read…
        </button>
      ) : null}
      {problem ? (
        <span role="alert" className="block max-w-64 text-bad">
          {problem}
        </span>
      ) : null}
    </span>
  );
}

/** Counts of an upload and of its re-read side by side, filled in as the re-read finishes. */
export function RereadComparison({ before, afterId }: { before: UploadListItem; afterId: number }) {
  const after = useQuery(uploadQuery(afterId));
  const queryClient = useQueryClient();
  const finished = after.data && settled(after.data);
  const reported = useRef(false);
  const heading = useRef<HTMLHeadingElement>(null);
  useEffect(() => {
    if (!finished || reported.current) return;
    reported.current = true;
    void uploadChanged(queryClient, before.campaignId);
    heading.current?.focus();
  }, [finished, queryClient, before.campaignId]);
  const next = after.data;
  const reasons = [...new Set([...Object.keys(before.samples.rejectedByReason), ...Object.keys(next && finished ? next.samples.rejectedByReason : {})])];
  const cell = (value: number | undefined) => (next && finished ? formatNumber(value ?? 0) : "…");
  return (
    <div className="space-y-2" data-testid="reread-comparison">
      <h3 ref={heading} tabIndex={-1} className="font-semibold">
        {finished ? `Re-read finished: upload #${afterId} replaces #${before.id}` : `Re-reading the stored file as upload #${afterId}…`}
      </h3>
      <p role="status" className="sr-only">
        {finished && next ? `Re-read finished: ${next.samples.accepted} accepted, ${next.samples.rejected} rejected; before: ${before.samples.accepted} accepted, ${before.samples.rejected} rejected.` : ""}
      </p>
      {next?.status === "failed" ? <p className="text-sm text-bad">The re-read failed: {next.error}</p> : null}
      <div className="overflow-x-auto">
        <table className="border-collapse text-sm">
          <caption className="sr-only">Counts before and after the re-read</caption>
          <thead>
            <tr className="border-b border-line">
              <th scope="col" className="py-1 pr-4 text-left">Rows</th>
              <th scope="col" className="num py-1 pr-4">Before (upload #{before.id})</th>
              <th scope="col" className="num py-1">After (upload #{afterId})</th>
            </tr>
          </thead>
          <tbody>
            {(
              [
                ["read", before.samples.read, next?.samples.read],
                ["accepted", before.samples.accepted, next?.samples.accepted],
                ["rejected", before.samples.rejected, next?.samples.rejected],
              ] as const
            ).map(([label, was, now]) => (
              <tr key={label} className="border-b border-line/60">
                <th scope="row" className="py-1 pr-4 text-left font-semibold">
                  {label}
                </th>
                <td className="num py-1 pr-4" data-testid={`before-${label}`}>
                  {formatNumber(was)}
                </td>
                <td className="num py-1" data-testid={`after-${label}`}>
                  {cell(now)}
                </td>
              </tr>
            ))}
            {reasons.map((reason) => (
              <tr key={reason} className="border-b border-line/60 text-ink-soft">
                <th scope="row" className="py-1 pr-4 pl-3 text-left font-normal">
                  <Reason reason={reason} />
                </th>
                <td className="num py-1 pr-4">{formatNumber(before.samples.rejectedByReason[reason as keyof typeof before.samples.rejectedByReason] ?? 0)}</td>
                <td className="num py-1">{cell(next?.samples.rejectedByReason[reason as keyof typeof before.samples.rejectedByReason])}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

function NumberField({ label, unit, value, onChange }: { label: string; unit: string; value: string; onChange: (value: string) => void }) {
  const id = useId();
  return (
    <span className="block">
      <label htmlFor={id} className="block text-sm font-semibold">
        {label} <span className="font-normal text-ink-soft">({unit})</span>
      </label>
      <input id={id} inputMode="decimal" value={value} onChange={(event) => onChange(event.target.value)} className="mt-0.5 w-28 rounded border border-line bg-panel px-2 py-1 tabular-nums" />
    </span>
  );
}

/**
 * Re-reads an upload's stored raw file with a corrected mapping and/or monitor settings. The file's columns come
 * from its first bytes; the result shows the counts before and after side by side.
 */
export function RereadPanel({ upload, campaign, onClose }: { upload: UploadListItem; campaign: CampaignDetail; onClose: () => void }) {
  const head = useQuery({
    queryKey: uploadKeys.rawHead(upload.id),
    // The stored read options (delimiter, header line) say where the columns are.
    queryFn: async () => readLogHead(await rawFileHead(upload.id, HEAD_BYTES), undefined, upload.readOptions),
    staleTime: Number.POSITIVE_INFINITY,
  });
  const start = upload.monitorOverride ?? campaign.monitor;
  const [mapping, setMapping] = useState<ColumnMapping>(upload.mapping as ColumnMapping);
  const [apertureMm, setApertureMm] = useState(String(start.apertureMm));
  const [baselineMm, setBaselineMm] = useState(String(start.baselineMm));
  const [wavelengthNm, setWavelengthNm] = useState(String(start.wavelengthNm));
  const [pixelScale, setPixelScale] = useState(start.pixelScaleArcsec === null ? "" : String(start.pixelScaleArcsec));
  const [reason, setReason] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  const [afterId, setAfterId] = useState<number | null>(null);
  const reasonId = useId();
  const heading = useRef<HTMLHeadingElement>(null);
  useEffect(() => heading.current?.focus(), []);

  if (afterId !== null) {
    return (
      <Frame heading={heading} title={`Re-read of ${upload.fileName}`} onClose={onClose}>
        <RereadComparison before={upload} afterId={afterId} />
      </Frame>
    );
  }
  const monitorChanged =
    Number(apertureMm) !== start.apertureMm ||
    Number(baselineMm) !== start.baselineMm ||
    Number(wavelengthNm) !== start.wavelengthNm ||
    (pixelScale === "" ? null : Number(pixelScale)) !== start.pixelScaleArcsec;
  const problems = head.data ? mappingProblems(mapping, head.data.headers, pixelScale === "" ? null : Number(pixelScale)) : [];
  const submit = async () => {
    setProblem(null);
    try {
      const monitor = monitorChanged
        ? {
            apertureMm: Number(apertureMm),
            baselineMm: Number(baselineMm),
            wavelengthNm: Number(wavelengthNm),
            response: start.response,
            ...(pixelScale === "" ? {} : { pixelScaleArcsec: Number(pixelScale) }),
            ...(start.exposureMs === null ? {} : { exposureMs: start.exposureMs }),
            ...(start.heightAboveGroundM === null ? {} : { heightAboveGroundM: start.heightAboveGroundM }),
          }
        : undefined;
      const accepted = await rereadUpload(upload.id, { mapping: mapping as ColumnMappingInput, reason, ...(monitor ? { monitor } : {}) });
      setAfterId(accepted.upload.id);
    } catch (error) {
      setProblem(error instanceof ApiError ? error.message : "The re-read could not be started. Try again.");
    }
  };
  return (
    <Frame heading={heading} title={`Re-read ${upload.fileName} (upload #${upload.id})`} onClose={onClose}>
      <p className="text-sm text-ink-soft">
        The stored file is read again with the mapping and monitor below. A new upload replaces #{upload.id}, which is withdrawn in the same step (it can be restored later); the counts are shown side by side.
      </p>
      {head.isPending ? <p role="status" className="text-sm text-ink-soft">Reading the stored file's columns…</p> : null}
      {head.isError ? <p role="alert" className="text-sm text-bad">{head.error.message}</p> : null}
      {head.data ? (
        <MappingEditor headers={head.data.headers} rows={head.data.rows} mapping={mapping} onChange={setMapping} pixelScaleArcsec={pixelScale === "" ? null : Number(pixelScale)} wavelengthNm={Number(wavelengthNm)} />
      ) : null}
      <fieldset className="flex flex-wrap gap-4 rounded-lg border border-line bg-paper p-3">
        <legend className="px-1 text-sm font-semibold">Monitor settings for this file</legend>
        <NumberField label="Subaperture diameter" unit="mm" value={apertureMm} onChange={setApertureMm} />
        <NumberField label="Baseline" unit="mm" value={baselineMm} onChange={setBaselineMm} />
        <NumberField label="Wavelength" unit="nm" value={wavelengthNm} onChange={setWavelengthNm} />
        <NumberField label="Pixel scale" unit="″/px, empty if none" value={pixelScale} onChange={setPixelScale} />
        <p className="w-full text-xs text-ink-soft">{monitorChanged ? "Corrected settings: this file is read with these instead of the campaign's." : "The campaign's settings (change a value to correct it for this file only)."}</p>
      </fieldset>
      <label htmlFor={reasonId} className="block text-sm font-semibold">
        Why read it again? (kept in the audit log)
      </label>
      <input id={reasonId} value={reason} onChange={(event) => setReason(event.target.value)} className="w-full max-w-xl rounded border border-line bg-panel px-2 py-1" />
      {problem ? (
        <p role="alert" className="text-sm text-bad">
          {problem}
        </p>
      ) : null}
      <button type="button" disabled={!head.data || problems.length > 0 || reason.trim().length < 3} onClick={() => void submit()} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-50">
        Re-read the stored file
      </button>
      {reason.trim().length < 3 ? <span className="ml-3 text-sm text-ink-soft">Say in a few words why, to re-read.</span> : null}
    </Frame>
  );
}

function Frame({ heading, title, onClose, children }: { heading: React.RefObject<HTMLHeadingElement | null>; title: string; onClose: () => void; children: ReactNode }) {
  return (
    <section aria-labelledby="reread-heading" className="space-y-3 rounded-lg border border-accent/40 bg-panel p-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="reread-heading" ref={heading} tabIndex={-1} className="text-lg font-semibold">
          {title}
        </h2>
        <button type="button" onClick={onClose} className="rounded border border-line px-3 py-1 text-sm font-semibold">
          Close
        </button>
      </div>
      {children}
    </section>
  );
}

/** In the wizard: the same bytes were sent with another mapping; read the stored file with it instead. */
export function RereadOffer({ before, mapping }: { before: UploadListItem; mapping: ColumnMappingInput }) {
  const [reason, setReason] = useState("Sent again with a corrected mapping");
  const [afterId, setAfterId] = useState<number | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const reasonId = useId();
  if (afterId !== null) return <RereadComparison before={before} afterId={afterId} />;
  return (
    <div className="space-y-1 rounded-md border border-line bg-paper p-2">
      <label htmlFor={reasonId} className="block font-semibold">
        Why read it again? (kept in the audit log)
      </label>
      <input id={reasonId} value={reason} onChange={(event) => setReason(event.target.value)} className="w-full max-w-xl rounded border border-line bg-panel px-2 py-1" />
      <button
        type="button"
        disabled={reason.trim().length < 3}
        onClick={async () => {
          setProblem(null);
          try {
            setAfterId((await rereadUpload(before.id, { mapping, reason })).upload.id);
          } catch (error) {
            setProblem(error instanceof ApiError ? error.message : "The re-read could not be started. Try again.");
          }
        }}
        className="rounded-md bg-accent px-3 py-1 font-semibold text-white hover:bg-accent-strong disabled:opacity-50"
      >
        Re-read the stored file with this mapping
      </button>
      {problem ? (
        <p role="alert" className="text-bad">
          {problem}
        </p>
      ) : null}
    </div>
  );
}
