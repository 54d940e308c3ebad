import { useState } from "react";
import { COMMENT_MAX_CHARS, type CommentThread, type CommentView } from "@calmcrest/contracts";
import { ApiError } from "../../api/client";
import { useCommentChange } from "../../api/mutations";
import { addComment, patchComment } from "../../api/reports";
import { formatDateTimeUtc } from "../../lib/format";
import { Markdown } from "../markdown";
import { Problem } from "../page";

// Comment threads on a report or one of its sections: write, reply, edit (15 minutes), withdraw, resolve, reopen.

export type ThreadFilter = "all" | "open" | "resolved" | "mine";
export const THREAD_FILTERS: { value: ThreadFilter; label: string }[] = [
  { value: "all", label: "All" },
  { value: "open", label: "Open" },
  { value: "resolved", label: "Resolved" },
  { value: "mine", label: "Mine" },
];

export function threadMatches(thread: CommentThread, filter: ThreadFilter, myId: string): boolean {
  if (filter === "open") return thread.status === "open";
  if (filter === "resolved") return thread.status === "resolved";
  if (filter === "mine") return thread.comments.some((comment) => comment.author.id === myId);
  return true;
}

const messageOf = (error: unknown) => (error instanceof ApiError ? error.message : "That did not work. Check your connection and try again.");

/** Runs a change of the threads (a call that answers with all of them) and waits until the page shows it. */
function useCommentsUpdate(reportId: number) {
  return useCommentChange(reportId).mutateAsync;
}

/** A textarea with a send button; used for new threads, replies and edits. */
function CommentForm({ label, initial = "", submitLabel, onSubmit, onCancel, idPrefix }: { label: string; initial?: string; submitLabel: string; onSubmit: (body: string) => Promise<void>; onCancel?: () => void; idPrefix: string }) {
  const [body, setBody] = useState(initial);
  const [problem, setProblem] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const id = `${idPrefix}-body`;
  return (
    <form
      className="space-y-2 print:hidden"
      onSubmit={async (event) => {
        event.preventDefault();
        if (body.trim() === "") {
          setProblem("Write something before sending.");
          return;
        }
        setBusy(true);
        setProblem(null);
        try {
          await onSubmit(body);
          setBody("");
        } catch (error) {
          setProblem(messageOf(error));
        } finally {
          setBusy(false);
        }
      }}
    >
      <label htmlFor={id} className="block text-sm font-semibold">
        {label}
      </label>
      <textarea
        id={id}
        value={body}
        maxLength={COMMENT_MAX_CHARS}
        onChange={(event) => setBody(event.target.value)}
        rows={3}
        className="w-full rounded-md border border-line bg-panel px-2 py-1.5 text-sm"
        aria-describedby={`${id}-hint`}
      />
      <p id={`${id}-hint`} className="text-xs text-ink-soft">
        Plain text with light Markdown: *emphasis*, **bold**, `code`, lists, quotes and links.
      </p>
      <div className="flex flex-wrap gap-2">
        <button type="submit" disabled={busy} className="rounded-md bg-accent px-3 py-1 text-sm font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
          {submitLabel}
        </button>
        {onCancel ? (
          <button type="button" onClick={onCancel} className="rounded-md border border-line px-3 py-1 text-sm">
            Cancel
          </button>
        ) : null}
      </div>
      <Problem text={problem} />
    </form>
  );
}

function CommentItem({ comment, reportId, shownVersion }: { comment: CommentView; reportId: number; shownVersion: number }) {
  const update = useCommentsUpdate(reportId);
  const [editing, setEditing] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const mayEdit = comment.editableUntil !== null && Date.parse(comment.editableUntil) > Date.now();
  return (
    <li id={`comment-${comment.id}`} className="rounded-md border border-line bg-paper p-3">
      <p className="flex flex-wrap gap-x-2 text-xs text-ink-soft">
        <span className="font-semibold text-ink">{comment.author.name}</span>
        <span>{formatDateTimeUtc(comment.createdAt)}</span>
        {comment.version !== shownVersion ? <span>on version {comment.version}</span> : null}
        {comment.editedAt ? <span>(edited)</span> : null}
      </p>
      {comment.withdrawn ? (
        <p className="mt-1 text-sm italic text-ink-soft">Withdrawn by its author.</p>
      ) : editing ? (
        <div className="mt-2">
          <CommentForm
            idPrefix={`edit-${comment.id}`}
            label="Edit your comment"
            initial={comment.body ?? ""}
            submitLabel="Save the change"
            onCancel={() => setEditing(false)}
            onSubmit={async (body) => {
              await update(() => patchComment(comment.id, { action: "edit", body }));
              setEditing(false);
            }}
          />
        </div>
      ) : (
        <Markdown source={comment.body ?? ""} lite className="mt-1 text-sm" />
      )}
      {!comment.withdrawn && comment.editableUntil !== null && !editing ? (
        <div className="mt-2 flex flex-wrap gap-2 text-xs print:hidden">
          {mayEdit ? (
            <button type="button" onClick={() => setEditing(true)} className="rounded border border-line px-2 py-0.5 font-semibold text-accent">
              Edit (until {formatDateTimeUtc(comment.editableUntil).slice(11)})
            </button>
          ) : null}
          <button
            type="button"
            onClick={async () => {
              setProblem(null);
              try {
                await update(() => patchComment(comment.id, { action: "withdraw" }));
              } catch (error) {
                setProblem(messageOf(error));
              }
            }}
            className="rounded border border-line px-2 py-0.5 font-semibold text-bad"
          >
            Withdraw
          </button>
        </div>
      ) : null}
      <Problem text={problem} className="mt-2" />
    </li>
  );
}

/** One thread: its comments, its state, reply and resolve/reopen. */
export function Thread({ thread, reportId, shownVersion, canComment }: { thread: CommentThread; reportId: number; shownVersion: number; canComment: boolean }) {
  const update = useCommentsUpdate(reportId);
  const [replying, setReplying] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const moderate = async (action: "resolve" | "reopen") => {
    setProblem(null);
    try {
      await update(() => patchComment(thread.id, { action }));
    } catch (error) {
      setProblem(messageOf(error));
    }
  };
  return (
    <article aria-label={`Thread started by ${thread.comments[0]?.author.name ?? "someone"}`} className={`thread rounded-lg border p-3 ${thread.status === "resolved" ? "border-line bg-panel" : "border-accent/40 bg-panel"}`}>
      <p className="mb-2 flex flex-wrap items-center gap-2 text-xs">
        <span className={`rounded px-2 py-0.5 font-semibold ${thread.status === "resolved" ? "bg-paper text-good" : "bg-accent-pale text-accent-strong"}`}>
          {thread.status === "resolved" ? `Resolved${thread.resolvedBy ? ` by ${thread.resolvedBy.name}` : ""}` : "Open"}
        </span>
        <span className="text-ink-soft">
          {thread.sectionTitle ? `On “${thread.sectionTitle}”` : "On the whole report"}, version {thread.version}
        </span>
      </p>
      <ol className="space-y-2">
        {thread.comments.map((comment) => (
          <CommentItem key={comment.id} comment={comment} reportId={reportId} shownVersion={shownVersion} />
        ))}
      </ol>
      <div className="mt-2 flex flex-wrap gap-2 print:hidden">
        {canComment && !replying ? (
          <button type="button" onClick={() => setReplying(true)} className="rounded-md border border-line px-3 py-1 text-sm font-semibold text-accent">
            Reply
          </button>
        ) : null}
        {thread.canModerate ? (
          <button type="button" onClick={() => moderate(thread.status === "resolved" ? "reopen" : "resolve")} className="rounded-md border border-line px-3 py-1 text-sm font-semibold">
            {thread.status === "resolved" ? "Reopen" : "Mark resolved"}
          </button>
        ) : null}
      </div>
      {replying ? (
        <div className="mt-2">
          <CommentForm
            idPrefix={`reply-${thread.id}`}
            label="Your reply"
            submitLabel="Send reply"
            onCancel={() => setReplying(false)}
            onSubmit={async (body) => {
              await update(() => addComment(reportId, { body, version: shownVersion, parentId: thread.id }));
              setReplying(false);
            }}
          />
        </div>
      ) : null}
      <Problem text={problem} className="mt-2" />
    </article>
  );
}

/** The threads of one place (a section, or the whole report) and the form to start a new one. */
export function Discussion({
  reportId,
  sectionId,
  placeName,
  threads,
  shownVersion,
  canComment,
  filter,
}: {
  reportId: number;
  sectionId: number | null;
  placeName: string;
  threads: CommentThread[];
  shownVersion: number;
  canComment: boolean;
  filter: ThreadFilter;
}) {
  const update = useCommentsUpdate(reportId);
  const [open, setOpen] = useState(false);
  return (
    <div className="discussion mt-3 space-y-2">
      {threads.map((thread) => (
        <Thread key={thread.id} thread={thread} reportId={reportId} shownVersion={shownVersion} canComment={canComment} />
      ))}
      {threads.length === 0 && filter !== "all" ? <p className="text-sm text-ink-soft print:hidden">No {filter === "mine" ? "threads of yours" : `${filter} threads`} here.</p> : null}
      {canComment ? (
        open ? (
          <CommentForm
            idPrefix={`new-${sectionId ?? "report"}`}
            label={`Comment on ${placeName} (version ${shownVersion})`}
            submitLabel="Send comment"
            onCancel={() => setOpen(false)}
            onSubmit={async (body) => {
              await update(() => addComment(reportId, { body, version: shownVersion, sectionId }));
              setOpen(false);
            }}
          />
        ) : (
          <button type="button" onClick={() => setOpen(true)} className="rounded-md border border-line bg-panel px-3 py-1 text-sm font-semibold text-accent print:hidden">
            Comment on {placeName}
          </button>
        )
      ) : null}
    </div>
  );
}
