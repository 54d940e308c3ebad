import { useState } from "react";
import { useQuery, useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams, useSearchParams } from "react-router-dom";
import type { CommentThread, ReportDetail, ReportVersionView } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { reportCommentsQuery, reportPreviewQuery, reportQuery, reportVersionQuery } from "../api/reports";
import { ApiError } from "../api/client";
import { Markdown } from "../components/markdown";
import { Notice } from "../components/page";
import { ChangesPanel } from "../components/report/changes";
import { Discussion, THREAD_FILTERS, threadMatches, type ThreadFilter } from "../components/report/comments";
import { ComparisonView } from "../components/report/comparison-view";
import { printWithCharts } from "../components/on-demand";
import { ReportEditor } from "../components/report/editor";
import { formatDateUtc } from "../lib/format";
import { idParam } from "../route-loaders";

// /reports/:reportId: a published version (the latest, or ?version=N), its sections with their comment threads,
// the frozen comparison, "what changed", the newer-data banner; for leads and admins also the draft editor
// (?edit=1). The print stylesheet (styles.css) turns the version into a clean document.

/** Positive whole number from the address, or undefined. */
function numberParam(value: string | null): number | undefined {
  const number = Number(value);
  return value !== null && Number.isSafeInteger(number) && number > 0 ? number : undefined;
}

function TitleBlock({ view, lead }: { view: ReportVersionView; lead: string }) {
  const subjects = view.comparison.rows.map((row) => row.label).join(", ");
  return (
    <header className="report-title-block border-b border-line pb-4">
      <p className="text-sm font-semibold uppercase tracking-wide text-accent">Site report</p>
      <h1 className="mt-1 text-3xl font-semibold tracking-tight">{view.title}</h1>
      <p className="mt-2 text-ink-soft">
        Version {view.number}, published {formatDateUtc(view.publishedAt)} by {view.publishedBy.name}, computed from {view.uploads.length} upload{view.uploads.length === 1 ? "" : "s"}.
      </p>
      <p className="text-ink-soft">
        Compares: <span className="text-ink">{subjects}</span>. Survey lead: {lead}.
      </p>
      {view.note ? <p className="mt-1 text-sm">What is new in this version: {view.note}</p> : null}
    </header>
  );
}

function VersionPicker({ detail, view }: { detail: ReportDetail; view: ReportVersionView }) {
  return (
    <nav aria-label="Versions" className="flex flex-wrap items-center gap-2 text-sm print:hidden">
      <span className="font-semibold">Versions:</span>
      {detail.versions.map((version) => {
        const latest = version.number === view.latestNumber;
        const current = version.number === view.number;
        return (
          <Link
            key={version.number}
            to={latest ? `/reports/${detail.id}` : `/reports/${detail.id}?version=${version.number}`}
            aria-current={current ? "page" : undefined}
            className={`rounded-md border px-2 py-0.5 ${current ? "border-accent bg-accent-pale font-semibold" : "border-line bg-panel text-accent"}`}
          >
            {version.number} · {formatDateUtc(version.publishedAt)}
            {latest ? " (latest)" : ""}
          </Link>
        );
      })}
    </nav>
  );
}

function PublishedVersion({ detail, view, threads, myId }: { detail: ReportDetail; view: ReportVersionView; threads: CommentThread[]; myId: string }) {
  const [filter, setFilter] = useState<ThreadFilter>("all");
  const [searchParams, setSearchParams] = useSearchParams();
  const shown = threads.filter((thread) => threadMatches(thread, filter, myId));
  const inPlace = (sectionId: number | null) => shown.filter((thread) => thread.sectionId === sectionId);
  // Threads on sections this version does not have (deleted or added later) are listed with the whole report.
  const sectionIds = new Set(view.sections.map((section) => section.id));
  const elsewhere = shown.filter((thread) => thread.sectionId !== null && !sectionIds.has(thread.sectionId));
  const counts = (sectionId: number) => {
    const here = threads.filter((thread) => thread.sectionId === sectionId);
    const open = here.filter((thread) => thread.status === "open").length;
    return here.length === 0 ? null : `${here.length} thread${here.length === 1 ? "" : "s"}, ${open} open`;
  };
  const earlier = detail.versions.filter((version) => version.number < view.number);
  return (
    <div className="space-y-6">
      <TitleBlock view={view} lead={detail.lead.name} />
      <div className="flex flex-wrap items-center justify-between gap-3 print:hidden">
        <VersionPicker detail={detail} view={view} />
        <button type="button" onClick={() => void printWithCharts()} className="rounded-md border border-line bg-panel px-3 py-1 text-sm font-semibold">
          Print or save as PDF
        </button>
      </div>
      {view.number !== view.latestNumber ? (
        <Notice tone="warn" title={`You are reading version ${view.number}; the latest is version ${view.latestNumber}.`}>
          <Link to={`/reports/${detail.id}`} className="font-semibold text-accent underline">
            Read the latest version
          </Link>
          . Comments you write here are recorded against version {view.number}.
        </Notice>
      ) : null}
      {view.newerData.uploadsSince > 0 ? (
        <div role="status" className="newer-data rounded-lg border border-warn/40 bg-warn-pale p-4 print:hidden">
          <p className="font-semibold">
            {view.newerData.uploadsSince} upload{view.newerData.uploadsSince === 1 ? "" : "s"} since this version; the lead can publish a new version.
          </p>
          <p className="text-sm text-ink-soft">The numbers below are the ones frozen at publication and do not include {view.newerData.uploadsSince === 1 ? "it" : "them"}.</p>
        </div>
      ) : null}
      {view.changes ? (
        <details className="rounded-lg border border-line bg-panel p-4 print:hidden" open={searchParams.has("since")}>
          <summary className="cursor-pointer font-semibold text-accent">What changed since version {view.changes.fromVersion}</summary>
          {earlier.length > 1 ? (
            <label className="mt-2 flex items-center gap-2 text-sm">
              Compare with version
              <select
                value={view.changes.fromVersion}
                onChange={(event) => {
                  const next = new URLSearchParams(searchParams);
                  next.set("since", event.target.value);
                  setSearchParams(next, { replace: true });
                }}
                className="rounded-md border border-line bg-panel px-2 py-1"
              >
                {earlier.map((version) => (
                  <option key={version.number} value={version.number}>
                    {version.number}
                  </option>
                ))}
              </select>
            </label>
          ) : null}
          <div className="mt-3">
            <ChangesPanel changes={view.changes} />
          </div>
        </details>
      ) : null}

      {view.summary ? (
        <section aria-labelledby="report-summary">
          <h2 id="report-summary" className="text-xl font-semibold">
            Summary
          </h2>
          <p className="mt-2 whitespace-pre-line">{view.summary}</p>
        </section>
      ) : null}

      <fieldset className="flex flex-wrap items-center gap-2 print:hidden">
        <legend className="sr-only">Show comment threads</legend>
        <span className="text-sm font-semibold">Comments:</span>
        {THREAD_FILTERS.map((option) => (
          <label key={option.value} className={`cursor-pointer rounded-md border px-3 py-1 text-sm ${filter === option.value ? "border-accent bg-accent-pale font-semibold" : "border-line bg-panel"}`}>
            <input type="radio" name="thread-filter" value={option.value} checked={filter === option.value} onChange={() => setFilter(option.value)} className="sr-only" />
            {option.label} ({threads.filter((thread) => threadMatches(thread, option.value, myId)).length})
          </label>
        ))}
      </fieldset>

      {view.sections.map((section) => (
        <section key={section.id} id={`section-${section.id}`} aria-labelledby={`section-${section.id}-title`} className="report-section scroll-mt-4">
          <h2 id={`section-${section.id}-title`} className="flex flex-wrap items-baseline gap-x-3 text-xl font-semibold">
            {section.title}
            {counts(section.id) ? <span className="text-sm font-normal text-ink-soft print:hidden">{counts(section.id)}</span> : null}
          </h2>
          {section.body.trim() ? <Markdown source={section.body} className="mt-2" /> : <p className="mt-2 italic text-ink-soft">This section is empty in this version.</p>}
          <div className="print:hidden">
            <Discussion reportId={detail.id} sectionId={section.id} placeName={`“${section.title}”`} threads={inPlace(section.id)} shownVersion={view.number} canComment={detail.can.comment} filter={filter} />
          </div>
        </section>
      ))}

      <section aria-labelledby="report-comparison" className="report-comparison">
        <h2 id="report-comparison" className="text-xl font-semibold">
          The comparison
        </h2>
        <p className="mt-1 text-sm text-ink-soft">Frozen when version {view.number} was published ({formatDateUtc(view.publishedAt)}); later data does not change it.</p>
        <div className="mt-3">
          <ComparisonView comparison={view.comparison} />
        </div>
        <details className="uploads mt-3 rounded-lg border border-line bg-panel p-4">
          <summary className="cursor-pointer font-semibold text-accent">
            Computed from {view.uploads.length} upload{view.uploads.length === 1 ? "" : "s"}
          </summary>
          <ul className="mt-2 space-y-1 text-sm">
            {view.uploads.map((upload) => (
              <li key={upload.id} className="break-all">
                <span className="font-semibold">{upload.fileName}</span> ({upload.campaign}) · sha256 <code className="text-xs">{upload.sha256}</code>
              </li>
            ))}
          </ul>
        </details>
      </section>

      <section aria-labelledby="report-discussion" className="print:hidden">
        <h2 id="report-discussion" className="text-xl font-semibold">
          Comments on the whole report
        </h2>
        <Discussion reportId={detail.id} sectionId={null} placeName="the whole report" threads={[...inPlace(null), ...elsewhere]} shownVersion={view.number} canComment={detail.can.comment} filter={filter} />
      </section>
    </div>
  );
}

function LivePreview({ reportId }: { reportId: number }) {
  const preview = useQuery(reportPreviewQuery(reportId));
  if (preview.isPending) return <p role="status" className="text-ink-soft">Computing the comparison from today's data…</p>;
  if (preview.isError) {
    return (
      <Notice tone="bad" title="The comparison cannot be computed with these settings.">
        {preview.error instanceof ApiError ? preview.error.message : "Reload the page to try again."}
      </Notice>
    );
  }
  return <ComparisonView comparison={preview.data} />;
}

export function ReportPage() {
  const reportId = idParam(useParams().reportId);
  const [searchParams, setSearchParams] = useSearchParams();
  const { data: detail } = useSuspenseQuery(reportQuery(reportId));
  const { data: me } = useSuspenseQuery(meQuery);
  const requested = numberParam(searchParams.get("version"));
  const since = numberParam(searchParams.get("since"));
  const needsVersionQuery = requested !== undefined || since !== undefined;
  const versionNumber = requested ?? detail.version?.number;
  const versionQuery = useQuery({ ...reportVersionQuery(reportId, versionNumber ?? 1, since), enabled: needsVersionQuery && versionNumber !== undefined });
  const comments = useQuery({ ...reportCommentsQuery(reportId), enabled: detail.version !== null });
  const editing = detail.draft !== null && (searchParams.get("edit") === "1" || detail.version === null);
  const view = needsVersionQuery ? versionQuery.data : (detail.version ?? undefined);

  const tabs = detail.draft ? (
    <div role="tablist" aria-label="Report views" className="mb-4 flex flex-wrap gap-2 print:hidden">
      <button
        type="button"
        role="tab"
        aria-selected={!editing}
        disabled={detail.version === null}
        onClick={() => setSearchParams({}, { replace: false })}
        className={`rounded-md border px-3 py-1 text-sm font-semibold disabled:opacity-50 ${!editing ? "border-accent bg-accent-pale" : "border-line bg-panel"}`}
      >
        {detail.version ? "Published version" : "Not published yet"}
      </button>
      <button
        type="button"
        role="tab"
        aria-selected={editing}
        onClick={() => setSearchParams({ edit: "1" }, { replace: false })}
        className={`rounded-md border px-3 py-1 text-sm font-semibold ${editing ? "border-accent bg-accent-pale" : "border-line bg-panel"}`}
      >
        Draft and editor{detail.draft.unpublishedChanges && detail.version ? " (unpublished changes)" : ""}
      </button>
    </div>
  ) : null;

  return (
    <div className="report-page mx-auto w-full max-w-5xl px-4 py-6 sm:px-6">
      <p className="mb-3 text-sm print:hidden">
        <Link to="/reports" className="text-accent underline">
          ← All reports
        </Link>
      </p>
      {tabs}
      {editing && detail.draft ? (
        <div className="space-y-6">
          <div>
            <h1 className="text-2xl font-semibold tracking-tight">{detail.draft.title}</h1>
            <p className="text-ink-soft">
              {detail.version ? `Draft of version ${(detail.versions[detail.versions.length - 1]?.number ?? 0) + 1}. Committee members read version ${detail.version.number} until you publish.` : "A draft: only survey leads and administrators can see it until you publish it."}
            </p>
          </div>
          <ReportEditor key={detail.draft.sections.map((section) => section.id).join(",")} detail={detail} />
          <section aria-labelledby="live-comparison">
            <h2 id="live-comparison" className="text-xl font-semibold">
              The comparison as it would be frozen now
            </h2>
            <p className="mb-3 text-sm text-ink-soft">Computed from the data stored today with the saved settings; publishing stores exactly these numbers.</p>
            <LivePreview reportId={reportId} />
          </section>
        </div>
      ) : view ? (
        <PublishedVersion detail={detail} view={view} threads={comments.data?.threads ?? []} myId={me?.id ?? ""} />
      ) : versionQuery.isError ? (
        <Notice tone="bad" title="That version cannot be shown.">
          {versionQuery.error instanceof ApiError ? versionQuery.error.message : "Reload the page to try again."}{" "}
          <Link to={`/reports/${reportId}`} className="font-semibold text-accent underline">
            Read the latest version
          </Link>
        </Notice>
      ) : (
        <p role="status" className="text-ink-soft">
          Loading the version…
        </p>
      )}
    </div>
  );
}
