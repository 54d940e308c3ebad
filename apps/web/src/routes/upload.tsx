import { useEffect, useMemo, useRef, useState, type DragEvent } from "react";
import { useQuery } from "@tanstack/react-query";
import { useForm, useWatch } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { Link, useSearchParams } from "react-router-dom";
import { z } from "zod";
import { columnMappingSchema, type CampaignDetail } from "@calmcrest/contracts";
import { delimiterName, type ColumnMapping } from "@calmcrest/seeing-stats";
import { campaignQuery } from "../api/campaigns";
import { useVisibleCampaigns } from "../api/visible-campaigns";
import { Notice, Page } from "../components/page";
import { FileProgress, type FileSend } from "../components/upload/file-progress";
import { MappingEditor } from "../components/upload/mapping-editor";
import { LayoutFields, TimeFields } from "../components/upload/read-options-fields";
import { PreviewTable } from "../components/upload/preview-table";
import { WholeFileCheckView } from "../components/upload/whole-file-check";
import { leadingComments, monitorDisagreements, statedMonitor } from "../lib/comment-monitor";
import { mappingFitsHeaders } from "../lib/log-head";
import { formatBytes, formatNumber } from "../lib/format";
import { useReadOptions } from "../upload/useReadOptions";
import { useUploadBatch } from "../upload/useUploadBatch";

/** The wizard's form: the campaign, the mapping (the shared schema the server also checks) and whether to keep it. */
const wizardSchema = z.object({
  campaignId: z.string().regex(/^\d+$/, "Choose the campaign these logs belong to."),
  mapping: columnMappingSchema,
  keepMapping: z.boolean(),
});
type WizardValues = z.infer<typeof wizardSchema>;

function Step({ number, title, children, done }: { number: number; title: string; children: React.ReactNode; done?: boolean }) {
  return (
    <section aria-labelledby={`step-${number}`} className="rounded-lg border border-line bg-panel p-4 sm:p-5">
      <h2 id={`step-${number}`} className="mb-3 flex items-center gap-3 text-lg font-semibold">
        <span aria-hidden="true" className={`flex h-7 w-7 items-center justify-center rounded-full text-sm ${done ? "bg-accent text-white" : "border border-accent text-accent"}`}>
          {number}
        </span>
        {title}
      </h2>
      {children}
    </section>
  );
}


/** The sentence a screen reader hears once the batch is through. */
function announce(sends: FileSend[], finishedCount: number): string {
  const stored = sends.filter((send) => send.state === "stored").length;
  const duplicates = sends.filter((send) => send.state === "duplicate").length;
  const refused = sends.filter((send) => send.state === "refused").length;
  if (stored > 0 && finishedCount < stored) return `${stored} ${stored === 1 ? "file" : "files"} stored; reading into the database.`;
  const parts = [`${stored} of ${sends.length} ${sends.length === 1 ? "file" : "files"} stored and read`];
  if (duplicates > 0) parts.push(`${duplicates} already uploaded`);
  if (refused > 0) parts.push(`${refused} refused`);
  return `Upload finished: ${parts.join(", ")}. The counts are below.`;
}

export function UploadPage() {
  const [searchParams, setSearchParams] = useSearchParams();
  const { campaigns, pending, sites } = useVisibleCampaigns();
  const { control, register, setValue, handleSubmit, formState } = useForm<WizardValues>({
    resolver: zodResolver(wizardSchema),
    defaultValues: { campaignId: searchParams.get("campaign") ?? "", mapping: {}, keepMapping: true },
  });
  const campaignIdText = useWatch({ control, name: "campaignId" });
  const mapping = useWatch({ control, name: "mapping" }) as ColumnMapping;
  const campaignId = /^\d+$/.test(campaignIdText) ? Number(campaignIdText) : null;
  const campaign = useQuery({ ...campaignQuery(campaignId ?? 0), enabled: campaignId !== null });

  const selectedCampaign: CampaignDetail | undefined = campaign.data;
  /** How the files are read beyond the mapping: time format and zone, delimiter, header line, wavelength. */
  const options = useReadOptions(mapping, selectedCampaign?.monitor.wavelengthNm);
  const { readOptions } = options;
  const batch = useUploadBatch({ campaign: selectedCampaign, mapping, readOptions, readOptionsProblem: options.problem });
  const { files, head, headText, sends, running } = batch;
  const resultsHeading = useRef<HTMLHeadingElement>(null);
  const [mappingSource, setMappingSource] = useState<"saved" | "proposed" | null>(null);
  const fileInput = useRef<HTMLInputElement>(null);
  const [dragging, setDragging] = useState(false);

  // When the file or campaign changes, start from the campaign's saved mapping if it fits the file, else the proposal.
  const savedMapping = selectedCampaign?.savedMapping?.mapping as ColumnMapping | undefined;
  useEffect(() => {
    if (!head) return;
    if (savedMapping && mappingFitsHeaders(savedMapping, head.headers)) {
      setValue("mapping", savedMapping);
      setMappingSource("saved");
    } else {
      setValue("mapping", head.proposedMapping);
      setMappingSource("proposed");
    }
  }, [head, savedMapping, setValue]);

  const pixelScaleArcsec = selectedCampaign?.monitor.pixelScaleArcsec ?? null;
  const rawLines = useMemo(() => headText.split(/\r\n|\n|\r/).slice(0, 15), [headText]);
  const monitorWarning = useMemo(() => (selectedCampaign ? monitorDisagreements(statedMonitor(leadingComments(headText)), selectedCampaign.monitor) : []), [headText, selectedCampaign]);

  const onUpload = handleSubmit(async (values) => {
    await batch.send({ mapping: values.mapping, keepMapping: values.keepMapping });
    // The result is where the person's attention goes next (and what a screen reader reads).
    resultsHeading.current?.focus();
  });

  const onDrop = (event: DragEvent<HTMLDivElement>) => {
    event.preventDefault();
    setDragging(false);
    void batch.chooseFiles(Array.from(event.dataTransfer.files));
  };

  if (sites.length === 0) {
    return (
      <Page title="Upload logs">
        <Notice title="There is no campaign you can upload to.">
          Logs belong to a campaign (one monitor at one site). Ask the survey lead to create the campaign and an administrator to add you to it.
        </Notice>
      </Page>
    );
  }

  return (
    <Page title="Upload logs" intro="Send the monitor's logs from a trip. You check how Calmcrest reads the columns before anything is stored; rows that cannot be used are counted and listed, never silently dropped.">
      <form onSubmit={onUpload} noValidate className="space-y-5">
        <Step number={1} title="Campaign" done={Boolean(selectedCampaign)}>
          <label htmlFor="campaign" className="block text-sm font-semibold">
            Campaign the logs belong to
          </label>
          {pending ? (
            <p role="status" className="mt-1 text-sm text-ink-soft">
              Loading your campaigns…
            </p>
          ) : (
            <select
              id="campaign"
              disabled={running}
              className="mt-1 w-full max-w-xl rounded-md border border-line bg-panel px-3 py-2"
              aria-invalid={formState.errors.campaignId ? true : undefined}
              {...register("campaignId", {
                onChange: (event: React.ChangeEvent<HTMLSelectElement>) => {
                  const next = new URLSearchParams(searchParams);
                  next.set("campaign", event.target.value);
                  setSearchParams(next, { replace: true });
                },
              })}
            >
              <option value="">Choose a campaign</option>
              {campaigns.map((item) => (
                <option key={item.id} value={String(item.id)}>
                  {item.siteName} — {item.name}
                </option>
              ))}
            </select>
          )}
          {formState.errors.campaignId ? <p className="mt-1 text-sm text-bad">{formState.errors.campaignId.message}</p> : null}
          {selectedCampaign ? (
            <p className="mt-2 text-sm text-ink-soft">
              Monitor: {selectedCampaign.monitor.apertureMm} mm subapertures, {selectedCampaign.monitor.baselineMm} mm baseline, {selectedCampaign.monitor.wavelengthNm} nm,{" "}
              {selectedCampaign.monitor.heightAboveGroundM === null ? "height not recorded" : `${selectedCampaign.monitor.heightAboveGroundM} m above ground`}; uploads so far: {formatNumber(selectedCampaign.uploadCount)}.
            </p>
          ) : campaign.isError ? (
            <p className="mt-2 text-sm text-bad">{campaign.error.message}</p>
          ) : null}
        </Step>

        <Step number={2} title="Log files" done={files.length > 0 && Boolean(head)}>
          <div
            onDragOver={(event) => {
              event.preventDefault();
              setDragging(true);
            }}
            onDragLeave={() => setDragging(false)}
            onDrop={onDrop}
            className={`flex flex-col items-center justify-center gap-2 rounded-lg border-2 border-dashed p-6 text-center ${dragging ? "border-accent bg-accent-pale" : "border-line bg-paper"}`}
          >
            <p>Drop one or more log files here (comma, semicolon, tab or space separated), or</p>
            <button type="button" disabled={running} onClick={() => fileInput.current?.click()} className="rounded-md border border-accent px-4 py-1.5 font-semibold text-accent hover:bg-accent-pale">
              Choose files
            </button>
            <input
              ref={fileInput}
              type="file"
              multiple
              accept=".csv,.txt,.tsv,.log,.dat,text/csv,text/plain"
              aria-label="Log files"
              className="sr-only"
              tabIndex={-1}
              onChange={(event) => void batch.chooseFiles(Array.from(event.target.files ?? []))}
            />
          </div>
          {files.length > 0 ? (
            <ul className="mt-3 space-y-1 text-sm">
              {files.map((file) => (
                <li key={`${file.name}-${file.size}`} className="flex flex-wrap items-center justify-between gap-x-3 gap-y-1">
                  <span className="min-w-0 break-all font-semibold">{file.name}</span>
                  <span className="flex items-center gap-3">
                    <span className="tabular-nums text-ink-soft">{formatBytes(file.size)}</span>
                    {sends === null || !running ? (
                      <button
                        type="button"
                        onClick={() => batch.removeFile(file)}
                        aria-label={`Remove ${file.name} from this batch`}
                        className="rounded border border-line px-2 py-0.5 text-xs font-semibold hover:bg-bad-pale"
                      >
                        Remove
                      </button>
                    ) : null}
                  </span>
                </li>
              ))}
            </ul>
          ) : null}
          {files.length > 0 ? (
            <LayoutFields options={options} head={head} disabled={running} />
          ) : null}
          {batch.headError ? (
            <p role="alert" className="mt-3 rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
              {batch.headError}
            </p>
          ) : null}
          {batch.headerMismatch.length > 0 ? (
            <p role="alert" className="mt-3 rounded-md bg-warn-pale px-3 py-2 text-sm text-warn">
              {batch.headerMismatch.join(", ")} {batch.headerMismatch.length === 1 ? "has" : "have"} different columns from {files[0]?.name}. One mapping serves the whole batch: upload files with other columns separately.
            </p>
          ) : null}
        </Step>

        {head && selectedCampaign && sends === null ? (
          <Step number={3} title="Columns and units" done={batch.problems.length === 0}>
            <p className="mb-3 text-sm text-ink-soft">
              {mappingSource === "saved"
                ? "The mapping saved for this campaign fits these files and is filled in. Check it and go on."
                : `Proposed from the column names of ${files[0]?.name ?? "the file"} (columns separated by ${delimiterName(head.delimiter)}). Correct anything that is wrong.`}
            </p>
            {monitorWarning.length > 0 ? (
              <p role="alert" className="mb-3 rounded-md border border-warn/40 bg-warn-pale px-3 py-2 text-sm text-warn" data-testid="comment-monitor-warning">
                The comment lines of {files[0]?.name ?? "the file"} state other monitor settings than the campaign {selectedCampaign.name}: {monitorWarning.join("; ")}. Is this the right campaign? Its samples would be computed with the campaign's settings.
              </p>
            ) : null}
            <div className="grid gap-4 xl:grid-cols-[minmax(0,1fr)_minmax(0,26rem)]">
              <div className="min-w-0">
                <MappingEditor
                  headers={head.headers}
                  rows={head.rows}
                  mapping={mapping}
                  onChange={(next) => setValue("mapping", next, { shouldDirty: true })}
                  pixelScaleArcsec={pixelScaleArcsec}
                  wavelengthNm={selectedCampaign.monitor.wavelengthNm}
                  wavelength={options.wavelength}
                />
              </div>
              <figure className="min-w-0">
                <figcaption className="mb-1 text-sm font-semibold">First lines of {files[0]?.name ?? "the file"}, as written</figcaption>
                {/* Line numbers beside the text, for "Column names on line"; the text itself stays as written. */}
                <div className="flex max-h-96 overflow-auto rounded-md border border-line bg-paper p-2 font-mono text-xs">
                  <pre aria-hidden="true" className="select-none border-r border-line pr-2 text-right text-ink-soft">
                    {rawLines.map((_, index) => index + 1).join("\n")}
                  </pre>
                  <pre className="pl-2" data-testid="raw-lines">
                    {rawLines.join("\n")}
                  </pre>
                </div>
              </figure>
            </div>
            <TimeFields options={options} />
            <label className="mt-4 flex items-center gap-2 text-sm">
              <input type="checkbox" {...register("keepMapping")} />
              Save this mapping for the campaign, so the next trip's logs need one click
            </label>
          </Step>
        ) : null}

        {head && selectedCampaign && batch.problems.length === 0 && files[0] && sends === null ? (
          <Step number={4} title="Check of every row" done={batch.checksDone}>
            <p className="mb-3 text-sm text-ink-soft">The server reads each whole file with this mapping, as the upload will, and stores nothing. The first rows as it reads them are listed below.</p>
            <ol className="mb-4 space-y-3">
              {files.map((file, index) => (
                <WholeFileCheckView
                  key={`${file.name}-${file.size}-${index}`}
                  fileName={file.name}
                  check={batch.checks[index] ?? { state: "waiting" }}
                  confirmed={batch.confirmed[index] ?? false}
                  onConfirm={(value) => batch.confirm(index, value)}
                />
              ))}
            </ol>
            <PreviewTable campaignId={selectedCampaign.id} file={files[0]} mapping={mapping} readOptions={readOptions} />
          </Step>
        ) : null}

        {batch.failure ? (
          <p role="alert" className="rounded-md bg-warn-pale px-3 py-2 text-sm text-warn">
            {batch.failure}
          </p>
        ) : null}

        <div className="flex flex-wrap items-center gap-3">
          {sends === null ? (
            <>
              <button type="submit" disabled={!batch.ready} className="rounded-md bg-accent px-5 py-2 font-semibold text-white hover:bg-accent-strong disabled:opacity-50">
                {files.length > 1 ? `Upload ${files.length} files` : "Upload"}
              </button>
              {!batch.ready ? <span className="text-sm text-ink-soft">{batch.notReadyText()}</span> : null}
            </>
          ) : (
            <span className="text-sm text-ink-soft">
              {running
                ? "Sending…"
                : sends.some((send) => send.state === "cancelled")
                  ? "Cancelled. Choose the files again above to upload them."
                  : "Sent. Choose more files above to upload another batch."}
            </span>
          )}
        </div>
      </form>

      {sends && selectedCampaign ? (
        <section aria-labelledby="results-heading" className="mt-6 space-y-3">
          <h2 id="results-heading" ref={resultsHeading} tabIndex={-1} className="text-lg font-semibold">
            Upload
          </h2>
          <p role="status" aria-live="polite" className="sr-only" data-testid="upload-announcement">
            {running ? "" : announce(sends, batch.finishedCount)}
          </p>
          <ol className="space-y-3">
            {files.map((file, index) => (
              <FileProgress
                key={`${file.name}-${index}`}
                file={file}
                send={sends[index] ?? { state: "waiting" }}
                campaignId={selectedCampaign.id}
                onFinished={batch.onFinished}
                onCancel={batch.cancel}
                check={batch.checkResult(index)}
              />
            ))}
          </ol>
          {batch.finishedCount > 0 ? (
            <Link to={`/campaigns/${selectedCampaign.id}`} className="inline-block font-semibold text-accent underline">
              Open the campaign {selectedCampaign.name}
            </Link>
          ) : null}
        </section>
      ) : null}
    </Page>
  );
}
