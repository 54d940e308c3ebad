import { useState } from "react";
import { useSuspenseQuery } from "@tanstack/react-query";
import { Link, useNavigate, useSearchParams } from "react-router-dom";
import type { ReportListItem } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { ApiError } from "../api/client";
import { useCreateReport } from "../api/mutations";
import { reportsQuery } from "../api/reports";
import { Notice, Page, Problem } from "../components/page";
import { ComparisonPicker, type ComparisonSettings } from "../components/report/comparison-picker";
import { formatDateUtc } from "../lib/format";

/** Settings a link from the Compare page can carry (`/reports?sites=1,3&from=…`): they prefill a new report. */
const COMPARISON_KEYS = ["sites", "campaigns", "from", "to", "maxZenithDeg", "sunMaxDeg", "minFlux", "apertureM", "bandNm", "outerScaleM", "pairing"];

function NewReportForm({ initial, startOpen }: { initial: ComparisonSettings; startOpen: boolean }) {
  const navigate = useNavigate();
  const create = useCreateReport();
  const [open, setOpen] = useState(startOpen);
  const [title, setTitle] = useState("");
  const [summary, setSummary] = useState("");
  const [settings, setSettings] = useState<ComparisonSettings>(initial);
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  if (!open) {
    return (
      <button type="button" onClick={() => setOpen(true)} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong">
        New report
      </button>
    );
  }
  return (
    <form
      aria-labelledby="new-report-title"
      className="space-y-3 rounded-lg border border-line bg-panel p-4"
      onSubmit={async (event) => {
        event.preventDefault();
        setProblem(null);
        setBusy(true);
        try {
          const created = await create.mutateAsync({ title, summary, comparison: settings });
          await navigate(`/reports/${created.id}?edit=1`);
        } catch (error) {
          setProblem(error instanceof ApiError ? error.message : "The report could not be created. Check your connection and try again.");
        } finally {
          setBusy(false);
        }
      }}
    >
      <h2 id="new-report-title" className="text-lg font-semibold">
        New report from a comparison
      </h2>
      <label htmlFor="report-title" className="block text-sm">
        <span className="font-semibold">Title</span>
        <input id="report-title" required value={title} onChange={(event) => setTitle(event.target.value)} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" />
      </label>
      <label htmlFor="report-summary" className="block text-sm">
        <span className="font-semibold">Summary (optional)</span>
        <textarea id="report-summary" value={summary} onChange={(event) => setSummary(event.target.value)} rows={2} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" />
      </label>
      <ComparisonPicker value={settings} onChange={setSettings} idPrefix="new-report" />
      <p className="text-sm text-ink-soft">The report starts with the sections Method, Results, Caveats and Recommendation; you can rename, reorder, delete and add sections before publishing.</p>
      <div className="flex flex-wrap gap-2">
        <button type="submit" disabled={busy} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
          {busy ? "Creating…" : "Create the draft"}
        </button>
        <button type="button" onClick={() => setOpen(false)} className="rounded-md border border-line px-3 py-1.5">
          Cancel
        </button>
      </div>
      <Problem text={problem} />
    </form>
  );
}

function ReportCard({ report, editor }: { report: ReportListItem; editor: boolean }) {
  return (
    <li className="rounded-lg border border-line bg-panel p-4">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <Link to={`/reports/${report.id}`} className="text-lg font-semibold text-accent underline-offset-2 hover:underline">
          {report.title}
        </Link>
        <span className={`rounded px-2 py-0.5 text-xs font-semibold ${report.status === "draft" ? "bg-warn-pale text-warn" : "bg-accent-pale text-accent-strong"}`}>
          {report.latestVersion ? `Version ${report.latestVersion.number}, published ${formatDateUtc(report.latestVersion.publishedAt)}` : "Draft, not published"}
        </span>
      </div>
      {report.summary ? <p className="mt-1 text-sm">{report.summary}</p> : null}
      <p className="mt-2 flex flex-wrap gap-x-4 gap-y-1 text-sm text-ink-soft">
        {report.subjects.length > 0 ? <span>Compares {report.subjects.join(", ")}</span> : null}
        <span>Lead: {report.lead.name}</span>
        <span>
          {report.openThreads} open comment thread{report.openThreads === 1 ? "" : "s"}
        </span>
        {editor && report.unpublishedChanges && report.status === "published" ? <span className="text-warn">Draft has unpublished changes</span> : null}
      </p>
    </li>
  );
}

export function ReportsPage() {
  const { data: reports } = useSuspenseQuery(reportsQuery);
  const { data: me } = useSuspenseQuery(meQuery);
  const [searchParams] = useSearchParams();
  const editor = me?.role === "lead" || me?.role === "admin";
  const fromAddress: ComparisonSettings = Object.fromEntries(COMPARISON_KEYS.flatMap((key) => {
    const value = searchParams.get(key);
    return value ? [[key, value]] : [];
  }));
  const prefilled = Object.keys(fromAddress).length > 0;
  return (
    <Page
      title="Reports"
      intro={editor ? "Reports you write from a comparison of sites and publish, version by version, for the site-selection committee." : "Site reports the survey lead has published for you. Read them and comment on any section."}
    >
      {editor ? (
        <div className="mb-5">
          <NewReportForm initial={fromAddress} startOpen={prefilled} />
        </div>
      ) : null}
      {reports.length === 0 ? (
        editor ? (
          <Notice title="No reports yet.">
            Start one with New report: choose two to six sites to compare, write the sections (Method, Results, Caveats, Recommendation), then publish a version. Committee members see
            a report only once a version is published, and get an e-mail when it is.
          </Notice>
        ) : (
          <Notice title="No report has been shared with you yet.">
            When the survey lead publishes a report for the committee, it appears here and you get an e-mail with a link to it. Nothing to do until then.
          </Notice>
        )
      ) : (
        <ul className="space-y-3">
          {reports.map((report) => (
            <ReportCard key={report.id} report={report} editor={editor} />
          ))}
        </ul>
      )}
    </Page>
  );
}
