import { useEffect, useRef, useState } from "react";
import { keepPreviousData, useQuery, useQueryClient, useSuspenseQuery } from "@tanstack/react-query";
import { createColumnHelper } from "@tanstack/react-table";
import { Link, useParams } from "react-router-dom";
import type { UploadListItem } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { campaignQuery, campaignSummaryQuery } from "../api/campaigns";
import { useChangeUpload } from "../api/mutations";
import { ApiError } from "../api/client";
import { DataTable } from "../components/data-table";
import { EditCampaignForm } from "../components/edit-forms";
import { Exclusions } from "../components/exclusions";
import { FilterPanel, useFilterParams } from "../components/filter-panel";
import { MonitorSettings } from "../components/monitor-settings";
import { Notice, Page } from "../components/page";
import { SummarySection } from "../components/summary-section";
import { RereadPanel, RereadRequest, UploadActions, UploadHistoryNote } from "../components/upload/reread";
import { formatBytes, formatDateTimeUtc, formatDateUtc, formatNumber } from "../lib/format";
import { idParam } from "../route-loaders";
import { campaignKeys, siteKeys } from "../api/query-keys";
import { Reason } from "../components/reason";

const STATUS_STYLES: Record<string, string> = {
  done: "bg-accent-pale text-accent-strong",
  failed: "bg-bad-pale text-bad",
  interrupted: "bg-warn-pale text-warn",
  queued: "bg-paper text-ink-soft",
  ingesting: "bg-paper text-ink",
};

/** The status word; a done upload with warnings reads "done, with warnings" in the warning colour; a withdrawn one says so. */
export function UploadStatusBadge({ status, warned = false, withdrawn = false }: { status: string; warned?: boolean; withdrawn?: boolean }) {
  if (withdrawn) return <span className="rounded-full bg-paper px-2 py-0.5 text-xs font-semibold text-ink-soft line-through decoration-1">{status}, withdrawn</span>;
  if (status === "done" && warned) return <span className="rounded-full bg-warn-pale px-2 py-0.5 text-xs font-semibold text-warn">done, with warnings</span>;
  return <span className={`rounded-full px-2 py-0.5 text-xs font-semibold ${STATUS_STYLES[status] ?? "bg-paper"}`}>{status}</span>;
}

/** Shown on failed or interrupted uploads to those who may upload: the server reads the stored file again. */
function RetryButton({ upload }: { upload: UploadListItem }) {
  const changeUpload = useChangeUpload(upload.campaignId);
  const { data: campaign } = useSuspenseQuery(campaignQuery(upload.campaignId));
  const [problem, setProblem] = useState<string | null>(null);
  if (!campaign.can.upload) return null;
  return (
    <span className="mt-1 block">
      <button
        type="button"
        onClick={async () => {
          setProblem(null);
          try {
            await changeUpload.mutateAsync({ kind: "retry", uploadId: upload.id });
          } catch (error) {
            setProblem(error instanceof ApiError ? error.message : "The retry could not be started.");
          }
        }}
        className="rounded border border-line px-2 py-0.5 text-xs font-semibold hover:bg-accent-pale"
      >
        Read it again
      </button>
      {problem ? <span className="mt-1 block max-w-64 text-xs text-bad">{problem}</span> : null}
    </span>
  );
}

const column = createColumnHelper<UploadListItem>();
const uploadColumns = [
  column.accessor("fileName", {
    header: "File",
    cell: (cell) => (
      <span>
        <span className="font-semibold">{cell.getValue()}</span>
        <span className="block text-xs text-ink-soft">{formatBytes(cell.row.original.sizeBytes)}</span>
      </span>
    ),
  }),
  column.accessor((upload) => upload.uploadedBy.name, { id: "uploader", header: "Uploaded by" }),
  column.accessor("uploadedAt", { header: "Time", meta: { unit: "UTC" }, cell: (cell) => <span className="whitespace-nowrap tabular-nums">{formatDateTimeUtc(cell.getValue())}</span> }),
  column.accessor("status", {
    header: "Status",
    cell: (cell) => (
      <span>
        <UploadStatusBadge status={cell.getValue()} warned={cell.row.original.warnings.length > 0} withdrawn={cell.row.original.withdrawn !== null} />
        <UploadHistoryNote upload={cell.row.original} />
        {cell.row.original.warnings.map((warning) => (
          <span key={warning.code} role="note" className="mt-1 block max-w-64 rounded bg-warn-pale px-1.5 py-0.5 text-xs text-warn">
            Warning: {warning.message}
          </span>
        ))}
        {cell.row.original.error ? <span className="mt-1 block max-w-64 text-xs text-bad">{cell.row.original.error}</span> : null}
        {(cell.getValue() === "failed" || cell.getValue() === "interrupted") && !cell.row.original.withdrawn ? <RetryButton upload={cell.row.original} /> : null}
      </span>
    ),
  }),
  column.accessor((upload) => upload.samples.accepted, { id: "accepted", header: "Accepted", meta: { unit: "rows", numeric: true }, cell: (cell) => formatNumber(cell.getValue()) }),
  column.accessor((upload) => upload.samples.rejected, {
    id: "rejected",
    header: "Rejected",
    meta: { unit: "rows, by reason", numeric: true },
    cell: (cell) => {
      const upload = cell.row.original;
      const reasons = Object.entries(upload.samples.rejectedByReason).filter(([, count]) => (count ?? 0) > 0);
      return (
        <span className="inline-flex flex-col items-end">
          <span className="font-semibold">{formatNumber(cell.getValue())}</span>
          {reasons.map(([reason, count]) => (
            <span key={reason} className="text-xs text-ink-soft">
              {formatNumber(count)} <Reason reason={reason} />
            </span>
          ))}
          {upload.samples.rejected > 0 ? (
            <a href={`/api/uploads/${upload.id}/rejected.csv`} className="text-xs font-semibold text-accent underline" download>
              rejected rows (CSV)
            </a>
          ) : null}
        </span>
      );
    },
  }),
  column.display({ id: "actions", header: "File actions", cell: (cell) => <ActionsCell upload={cell.row.original} /> }),
];

function ActionsCell({ upload }: { upload: UploadListItem }) {
  const { data: campaign } = useSuspenseQuery(campaignQuery(upload.campaignId));
  const me = useQuery(meQuery);
  return <UploadActions upload={upload} campaign={campaign} me={me.data} />;
}

export function CampaignPage() {
  const campaignId = idParam(useParams().campaignId);
  const { data: campaign } = useSuspenseQuery(campaignQuery(campaignId));
  const { filters } = useFilterParams();
  const summary = useQuery({ ...campaignSummaryQuery(campaignId, filters), placeholderData: keepPreviousData });
  const queryClient = useQueryClient();
  const [rereading, setRereading] = useState<UploadListItem | null>(null);
  // When an upload on this page finishes reading (after a retry, say), the figures and charts are recomputed.
  const finishedUploads = campaign.uploads.filter((upload) => upload.status === "done").length;
  const seenFinished = useRef(finishedUploads);
  useEffect(() => {
    if (seenFinished.current === finishedUploads) return;
    seenFinished.current = finishedUploads;
    void queryClient.invalidateQueries({ queryKey: campaignKeys.summaries(campaignId) });
    void queryClient.invalidateQueries({ queryKey: campaignKeys.allSamples(campaignId) });
    void queryClient.invalidateQueries({ queryKey: siteKeys.all });
  }, [finishedUploads, campaignId, queryClient]);

  return (
    <Page
      title={campaign.name}
      intro={
        <>
          Campaign at <Link to={`/sites/${campaign.site.id}`} className="font-semibold text-accent underline">{campaign.siteName}</Link> · {campaign.status} ·{" "}
          {formatDateUtc(campaign.startDate ?? campaign.firstSampleAt)} to {formatDateUtc(campaign.endDate ?? campaign.lastSampleAt)}
        </>
      }
      actions={
        campaign.can.upload ? (
          <Link to={`/upload?campaign=${campaign.id}`} className="rounded-md bg-accent px-4 py-2 font-semibold text-white hover:bg-accent-strong">
            Upload logs to this campaign
          </Link>
        ) : null
      }
    >
      <div className="space-y-8">
        <section aria-labelledby="monitor-heading" className="grid gap-4 rounded-lg border border-line bg-panel p-4 md:grid-cols-2">
          <div>
            <h2 id="monitor-heading" className="mb-2 text-lg font-semibold">
              Monitor
            </h2>
            <MonitorSettings monitor={campaign.monitor} />
          </div>
          <div className="text-sm">
            <h2 className="mb-2 text-lg font-semibold">Stored data</h2>
            <p>
              {formatNumber(campaign.sampleCount)} samples from {formatNumber(campaign.uploadCount)} {campaign.uploadCount === 1 ? "upload" : "uploads"}, {formatDateTimeUtc(campaign.firstSampleAt)} to {formatDateTimeUtc(campaign.lastSampleAt)}.
            </p>
            {campaign.notes ? <p className="mt-2 text-ink-soft">{campaign.notes}</p> : null}
          </div>
        </section>

        {/* The key starts a fresh form when the page moves to another campaign. */}
        {campaign.can.edit ? <EditCampaignForm key={campaign.id} campaign={campaign} /> : null}

        <section aria-labelledby="uploads-heading" className="space-y-3">
          <h2 id="uploads-heading" className="text-lg font-semibold">
            Uploads
          </h2>
          <RereadRequest.Provider value={setRereading}>
          <DataTable
            caption="Uploads of this campaign"
            columns={uploadColumns}
            data={campaign.uploads}
            initialSorting={[{ id: "uploadedAt", desc: true }]}
            pageSize={10}
            getRowId={(upload) => String(upload.id)}
            empty={
              <Notice title="No logs uploaded yet.">
                {campaign.can.upload ? "Upload the monitor's logs with the button above after each trip." : "The field engineers of this campaign upload its logs after each trip."}
              </Notice>
            }
          />
          </RereadRequest.Provider>
          {rereading ? <RereadPanel key={rereading.id} upload={rereading} campaign={campaign} onClose={() => setRereading(null)} /> : null}
        </section>

        <Exclusions campaign={campaign} />

        <FilterPanel />
        <SummarySection
          summary={summary}
          scope={{ kind: "campaign", id: campaignId }}
          filters={filters}
          noDataText="Nothing has been uploaded to this campaign yet."
          nothingPassesText="Widen the date window or relax the limits above."
        />
      </div>
    </Page>
  );
}
