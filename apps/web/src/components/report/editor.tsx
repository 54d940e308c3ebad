import { useState } from "react";
import { useQuery } from "@tanstack/react-query";
import { useNavigate } from "react-router-dom";
import type { ReportDetail, ReportDraft, ReportShare } from "@calmcrest/contracts";
import { ApiError } from "../../api/client";
import { usePublishReport, useReportDraftChange } from "../../api/mutations";
import { addSection, deleteSection, patchReport, patchSection, recipientsQuery, reorderSections } from "../../api/reports";
import { Markdown } from "../markdown";
import { Problem } from "../page";
import { ComparisonPicker, type ComparisonSettings } from "./comparison-picker";

// The lead's working copy: title, summary, what is compared, sections (add, rename, rewrite, reorder, delete),
// sharing, and publishing the next version. Nothing here changes a published version.

const messageOf = (error: unknown) => (error instanceof ApiError ? error.message : "That did not work. Check your connection and try again.");
const button = "rounded-md border border-line bg-panel px-3 py-1 text-sm font-semibold disabled:opacity-50";
const primary = "rounded-md bg-accent px-4 py-1.5 text-sm font-semibold text-white hover:bg-accent-strong disabled:opacity-60";

/** Runs a change of the draft (a call that answers with the whole draft) and waits until the page shows it. */
function useDetailUpdate(reportId: number) {
  return useReportDraftChange(reportId).mutateAsync;
}

function SectionEditor({ reportId, section, index, count, order }: { reportId: number; section: ReportDraft["sections"][number]; index: number; count: number; order: number[] }) {
  const update = useDetailUpdate(reportId);
  const [title, setTitle] = useState(section.title);
  const [body, setBody] = useState(section.body);
  const [preview, setPreview] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const dirty = title !== section.title || body !== section.body;
  const run = async (action: () => Promise<ReportDetail>) => {
    setProblem(null);
    setSaved(false);
    try {
      await update(() => action());
      return true;
    } catch (error) {
      setProblem(messageOf(error));
      return false;
    }
  };
  const move = (offset: number) => {
    const next = [...order];
    const [moved] = next.splice(index, 1);
    if (moved === undefined) return;
    next.splice(index + offset, 0, moved);
    void run(() => reorderSections(reportId, next));
  };
  const titleId = `section-${section.id}-title`;
  const bodyId = `section-${section.id}-body`;
  return (
    <li className="rounded-lg border border-line bg-panel p-4">
      <div className="flex flex-wrap items-end gap-2">
        <label htmlFor={titleId} className="min-w-0 flex-1 basis-56 text-sm">
          <span className="block font-semibold">Section {index + 1} title</span>
          <input id={titleId} value={title} onChange={(event) => setTitle(event.target.value)} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" />
        </label>
        <div className="flex flex-wrap gap-1">
          <button type="button" className={button} disabled={index === 0} onClick={() => move(-1)} aria-label={`Move “${section.title}” up`}>
            ↑ Up
          </button>
          <button type="button" className={button} disabled={index === count - 1} onClick={() => move(1)} aria-label={`Move “${section.title}” down`}>
            ↓ Down
          </button>
          <button
            type="button"
            className={`${button} text-bad`}
            onClick={() => {
              if (window.confirm(`Delete the section “${section.title}” from the draft? Published versions keep it.`)) void run(() => deleteSection(reportId, section.id));
            }}
          >
            Delete
          </button>
        </div>
      </div>
      <div className="mt-3">
        <div className="flex items-center justify-between">
          <label htmlFor={bodyId} className="text-sm font-semibold">
            Text (Markdown)
          </label>
          <button type="button" className="text-sm font-semibold text-accent underline" onClick={() => setPreview(!preview)}>
            {preview ? "Edit the text" : "Preview"}
          </button>
        </div>
        {preview ? (
          <Markdown source={body || "_Nothing written yet._"} className="mt-1 min-h-24 rounded-md border border-line bg-paper p-3" />
        ) : (
          <textarea id={bodyId} value={body} onChange={(event) => setBody(event.target.value)} rows={8} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5 font-mono text-sm" />
        )}
      </div>
      <div className="mt-2 flex flex-wrap items-center gap-3">
        <button
          type="button"
          className={primary}
          disabled={!dirty}
          onClick={async () => {
            if (await run(() => patchSection(reportId, section.id, { ...(title !== section.title ? { title } : {}), ...(body !== section.body ? { body } : {}) }))) setSaved(true);
          }}
        >
          Save section
        </button>
        {dirty ? <span className="text-sm text-warn">Unsaved changes</span> : saved ? <span role="status" className="text-sm text-good">Saved</span> : null}
      </div>
      <div className="mt-2">
        <Problem text={problem} />
      </div>
    </li>
  );
}

function ShareEditor({ reportId, share }: { reportId: number; share: ReportShare }) {
  const update = useDetailUpdate(reportId);
  const recipients = useQuery(recipientsQuery);
  const [mode, setMode] = useState<ReportShare["mode"]>(share.mode);
  const [chosen, setChosen] = useState<string[]>(share.mode === "named" ? share.userIds : []);
  const [problem, setProblem] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  return (
    <fieldset className="space-y-2 rounded-lg border border-line bg-panel p-4">
      <legend className="px-1 font-semibold">Who reads it</legend>
      <label className="flex items-center gap-2 text-sm">
        <input type="radio" name="share-mode" checked={mode === "all"} onChange={() => setMode("all")} /> Every committee member (the default)
      </label>
      <label className="flex items-center gap-2 text-sm">
        <input type="radio" name="share-mode" checked={mode === "named"} onChange={() => setMode("named")} /> Only these committee members:
      </label>
      {mode === "named" ? (
        <div className="ml-6 flex flex-wrap gap-2">
          {recipients.data?.length === 0 ? <p className="text-sm text-ink-soft">There are no committee members yet. An administrator adds them under People and access.</p> : null}
          {recipients.data?.map((person) => (
            <label key={person.id} className="flex items-center gap-2 rounded-md border border-line px-2 py-1 text-sm">
              <input type="checkbox" checked={chosen.includes(person.id)} onChange={() => setChosen(chosen.includes(person.id) ? chosen.filter((id) => id !== person.id) : [...chosen, person.id])} />
              {person.name}
            </label>
          ))}
        </div>
      ) : null}
      <div className="flex items-center gap-3">
        <button
          type="button"
          className={button}
          onClick={async () => {
            setProblem(null);
            setSaved(false);
            try {
              await update(() => patchReport(reportId, { share: mode === "all" ? { mode: "all" } : { mode: "named", userIds: chosen } }));
              setSaved(true);
            } catch (error) {
              setProblem(messageOf(error));
            }
          }}
        >
          Save sharing
        </button>
        {saved ? <span role="status" className="text-sm text-good">Saved. It applies to every version, published or not.</span> : null}
      </div>
      <Problem text={problem} />
    </fieldset>
  );
}

export function ReportEditor({ detail }: { detail: ReportDetail }) {
  const draft = detail.draft;
  const update = useDetailUpdate(detail.id);
  const publish = usePublishReport(detail.id);
  const navigate = useNavigate();
  const [title, setTitle] = useState(draft?.title ?? "");
  const [summary, setSummary] = useState(draft?.summary ?? "");
  const [settings, setSettings] = useState<ComparisonSettings>(draft?.comparisonQuery ?? {});
  const [newTitle, setNewTitle] = useState("");
  const [note, setNote] = useState("");
  const [problem, setProblem] = useState<string | null>(null);
  const [publishProblem, setPublishProblem] = useState<string | null>(null);
  const [publishing, setPublishing] = useState(false);
  const [savedHead, setSavedHead] = useState(false);
  if (!draft) return null;
  const order = draft.sections.map((section) => section.id);
  const headDirty = title !== draft.title || summary !== draft.summary || JSON.stringify(settings) !== JSON.stringify(draft.comparisonQuery);
  const nextNumber = (detail.versions[detail.versions.length - 1]?.number ?? 0) + 1;
  return (
    <div className="space-y-4">
      <section aria-labelledby="draft-head" className="space-y-3 rounded-lg border border-line bg-panel p-4">
        <h2 id="draft-head" className="text-lg font-semibold">
          Title, summary and comparison
        </h2>
        <label className="block text-sm" htmlFor="draft-title">
          <span className="font-semibold">Title</span>
          <input id="draft-title" value={title} onChange={(event) => setTitle(event.target.value)} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" />
        </label>
        <label className="block text-sm" htmlFor="draft-summary">
          <span className="font-semibold">Summary</span>
          <textarea id="draft-summary" value={summary} onChange={(event) => setSummary(event.target.value)} rows={3} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" />
        </label>
        <ComparisonPicker value={settings} onChange={setSettings} idPrefix="draft" />
        <div className="flex items-center gap-3">
          <button
            type="button"
            className={primary}
            disabled={!headDirty}
            onClick={async () => {
              setProblem(null);
              setSavedHead(false);
              try {
                await update(() => patchReport(detail.id, { title, summary, comparison: settings }));
                setSavedHead(true);
              } catch (error) {
                setProblem(messageOf(error));
              }
            }}
          >
            Save title, summary and comparison
          </button>
          {savedHead && !headDirty ? <span role="status" className="text-sm text-good">Saved</span> : null}
        </div>
        <Problem text={problem} />
      </section>

      <section aria-labelledby="draft-sections" className="space-y-3">
        <h2 id="draft-sections" className="text-lg font-semibold">
          Sections
        </h2>
        {draft.sections.length === 0 ? <p className="text-ink-soft">No sections yet: add at least one (for example Results) before publishing.</p> : null}
        <ol className="space-y-3">
          {draft.sections.map((section, index) => (
            // Keyed by id only: the editor keeps its text (and its "Saved" note) across the refresh its own save causes.
            <SectionEditor key={section.id} reportId={detail.id} section={section} index={index} count={draft.sections.length} order={order} />
          ))}
        </ol>
        <form
          className="flex flex-wrap items-end gap-2 rounded-lg border border-dashed border-line p-4"
          onSubmit={async (event) => {
            event.preventDefault();
            setProblem(null);
            try {
              await update(() => addSection(detail.id, { title: newTitle }));
              setNewTitle("");
            } catch (error) {
              setProblem(messageOf(error));
            }
          }}
        >
          <label htmlFor="new-section-title" className="min-w-0 flex-1 basis-56 text-sm">
            <span className="block font-semibold">New section title</span>
            <input id="new-section-title" value={newTitle} onChange={(event) => setNewTitle(event.target.value)} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" />
          </label>
          <button type="submit" className={button} disabled={newTitle.trim() === ""}>
            Add section
          </button>
        </form>
      </section>

      <ShareEditor reportId={detail.id} share={draft.share} />

      <section aria-labelledby="draft-publish" className="space-y-2 rounded-lg border border-accent/40 bg-accent-pale p-4">
        <h2 id="draft-publish" className="text-lg font-semibold">
          Publish version {nextNumber}
        </h2>
        <p className="text-sm">
          Publishing freezes the saved sections and the comparison computed from the data stored at that moment; later uploads never change it. Committee members it is
          shared with get an e-mail. {draft.unpublishedChanges ? "" : "The draft has no changes since the latest version (a new version would only pick up new data)."}
        </p>
        <label htmlFor="publish-note" className="block text-sm">
          <span className="font-semibold">What is new (optional, shown with the version)</span>
          <input id="publish-note" value={note} onChange={(event) => setNote(event.target.value)} className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" />
        </label>
        <button
          type="button"
          className={primary}
          disabled={publishing || headDirty}
          onClick={async () => {
            setPublishProblem(null);
            setPublishing(true);
            try {
              const version = await publish.mutateAsync({ note });
              setNote("");
              await navigate(`/reports/${detail.id}#version-${version.number}`);
            } catch (error) {
              setPublishProblem(messageOf(error));
            } finally {
              setPublishing(false);
            }
          }}
        >
          {publishing ? "Publishing…" : `Publish version ${nextNumber}`}
        </button>
        {headDirty ? <p className="text-sm text-warn">Save the title, summary and comparison first.</p> : null}
        <Problem text={publishProblem} />
      </section>
    </div>
  );
}
