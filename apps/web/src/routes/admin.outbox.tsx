import { useState } from "react";
import { useSuspenseQuery } from "@tanstack/react-query";
import { MAIL_KIND_LABELS, type OutboxMessage, type OutboxStatus } from "@calmcrest/contracts";
import { outboxQuery } from "../api/outbox";
import { Notice, Page } from "../components/page";
import { formatDateTimeUtc } from "../lib/format";

const STATUS_TEXT: Record<OutboxStatus, string> = {
  queued: "waiting to be sent",
  retrying: "sending failed, will retry",
  sent: "sent",
  failed: "failed, gave up",
};

const STATUS_TONE: Record<OutboxStatus, string> = {
  queued: "bg-accent-pale text-accent-strong",
  retrying: "bg-warn-pale text-warn",
  sent: "bg-panel text-good border border-line",
  failed: "bg-bad-pale text-bad",
};

function StatusBadge({ status }: { status: OutboxStatus }) {
  return <span className={`inline-block rounded px-2 py-0.5 text-xs font-semibold ${STATUS_TONE[status]}`}>{STATUS_TEXT[status]}</span>;
}

function MessageDetails({ message }: { message: OutboxMessage }) {
  return (
    <div className="space-y-4 border-t border-line p-4">
      <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
        <dt className="text-ink-soft">To</dt>
        <dd className="break-all">{message.to}</dd>
        <dt className="text-ink-soft">Kind</dt>
        <dd>{MAIL_KIND_LABELS[message.kind] ?? message.kind}</dd>
        <dt className="text-ink-soft">Written</dt>
        <dd>{formatDateTimeUtc(message.createdAt)}</dd>
        <dt className="text-ink-soft">Sent</dt>
        <dd>{message.sentAt ? `${formatDateTimeUtc(message.sentAt)} (${message.transport === "smtp" ? "SMTP" : "kept in the outbox"})` : "not yet"}</dd>
        <dt className="text-ink-soft">Attempts</dt>
        <dd>
          {message.attempts}
          {message.nextAttemptAt && message.status === "retrying" ? `; next try ${formatDateTimeUtc(message.nextAttemptAt)}` : ""}
        </dd>
        {message.lastError ? (
          <>
            <dt className="text-ink-soft">Last error</dt>
            <dd className="break-words text-bad">{message.lastError}</dd>
          </>
        ) : null}
      </dl>
      {message.links.length > 0 ? (
        <div>
          <h3 className="text-sm font-semibold">Links</h3>
          <ul className="mt-1 list-disc pl-5 text-sm">
            {message.links.map((link) => (
              <li key={link.url} className="break-all">
                {link.label}: <a className="text-accent underline" href={link.url}>{link.url}</a>
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      <div className="grid gap-4 lg:grid-cols-2">
        <div className="min-w-0">
          <h3 className="text-sm font-semibold">Text part</h3>
          <pre className="mt-1 max-h-96 overflow-auto whitespace-pre-wrap break-words rounded border border-line bg-paper p-3 text-sm">{message.text}</pre>
        </div>
        <div className="min-w-0">
          <h3 className="text-sm font-semibold">HTML part</h3>
          {/* The HTML part is shown in a sandboxed frame: no script, no forms, no navigation of this page. */}
          <iframe title={`HTML part of “${message.subject}”`} sandbox="" srcDoc={message.html} className="mt-1 h-96 w-full rounded border border-line bg-white" />
        </div>
      </div>
    </div>
  );
}

const FILTERS = ["all", "waiting", "failed"] as const;
type Filter = (typeof FILTERS)[number];
const FILTER_LABELS: Record<Filter, string> = { all: "All", waiting: "Waiting or retrying", failed: "Failed" };
const matches = (filter: Filter, message: OutboxMessage) =>
  filter === "all" || (filter === "failed" ? message.status === "failed" : message.status === "queued" || message.status === "retrying");

/** /admin/outbox: every e-mail Calmcrest wrote, as sent (administrators). */
export function OutboxPage() {
  const { data } = useSuspenseQuery(outboxQuery);
  const [filter, setFilter] = useState<Filter>("all");
  const shown = data.messages.filter((message) => matches(filter, message));
  return (
    <Page
      title="Outbox"
      intro={
        data.transport === "smtp"
          ? "Every e-mail Calmcrest wrote, newest first, and whether the mail server took it. Failed sends are retried with growing pauses."
          : "Every e-mail Calmcrest wrote, newest first. No mail server is configured (CALMCREST_SMTP_URL), so messages are kept here only and not delivered."
      }
    >
      {data.messages.length === 0 ? (
        <Notice title="No e-mail has been written yet.">
          Messages appear here when a report version is published, a comment is written, replied to or resolved, or someone is invited.
        </Notice>
      ) : (
        <>
          <fieldset className="mb-3 flex flex-wrap gap-2">
            <legend className="sr-only">Show</legend>
            {FILTERS.map((option) => (
              <label key={option} className={`cursor-pointer rounded-md border px-3 py-1 text-sm ${filter === option ? "border-accent bg-accent-pale font-semibold" : "border-line bg-panel"}`}>
                <input type="radio" name="outbox-filter" value={option} checked={filter === option} onChange={() => setFilter(option)} className="sr-only" />
                {FILTER_LABELS[option]} ({data.messages.filter((message) => matches(option, message)).length})
              </label>
            ))}
          </fieldset>
          {shown.length === 0 ? <Notice title="No message in this view." /> : null}
          <ul className="space-y-2">
            {shown.map((message) => (
              <li key={message.id}>
                <details className="rounded-lg border border-line bg-panel">
                  <summary className="flex cursor-pointer flex-wrap items-baseline gap-x-3 gap-y-1 p-3">
                    <span className="min-w-0 flex-1 basis-64 font-semibold">{message.subject}</span>
                    <span className="min-w-0 break-all text-sm text-ink-soft">to {message.to}</span>
                    <span className="text-sm text-ink-soft">{formatDateTimeUtc(message.createdAt)}</span>
                    <StatusBadge status={message.status} />
                  </summary>
                  <MessageDetails message={message} />
                </details>
              </li>
            ))}
          </ul>
        </>
      )}
    </Page>
  );
}
