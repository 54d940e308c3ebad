import { useSuspenseQuery } from "@tanstack/react-query";
import { Link, useSearchParams } from "react-router-dom";
import { AUDIT_ACTION_LABELS, AUDIT_ACTIONS } from "@calmcrest/contracts";
import { auditCsvUrl, auditFiltersFrom, auditQuery } from "../api/audit";
import { usersQuery } from "../api/users";
import { Notice, Page } from "../components/page";
import { formatDateTimeUtc } from "../lib/format";

const inputClass = "mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5";

export function AuditPage() {
  const [params, setParams] = useSearchParams();
  const filters = auditFiltersFrom(params);
  const { data } = useSuspenseQuery(auditQuery(filters));
  const { data: users } = useSuspenseQuery(usersQuery);
  const first = data.total === 0 ? 0 : (data.page - 1) * data.pageSize + 1;
  const last = Math.min(data.total, data.page * data.pageSize);
  const pages = Math.max(1, Math.ceil(data.total / data.pageSize));
  const goTo = (page: number) => {
    const next = new URLSearchParams(params);
    if (page > 1) next.set("page", String(page));
    else next.delete("page");
    setParams(next);
  };
  const filtered = Boolean(filters.userId || filters.action || filters.from || filters.to);

  return (
    <Page
      title="Audit log"
      intro="Who did what, when, and to what: sign-ins and refused sign-ins, invitations, role, access and account changes, uploads and exclusions. Rows are written once and never changed or removed. Times in UTC."
      actions={
        <a href={auditCsvUrl(filters)} download className="rounded-md border border-line bg-panel px-3 py-1.5 text-sm font-semibold text-accent hover:bg-accent-pale">
          Download CSV ({data.total} rows)
        </a>
      }
    >
      <div className="space-y-4">
        <form
          className="grid gap-3 rounded-lg border border-line bg-panel p-4 sm:grid-cols-2 lg:grid-cols-[1.3fr_1.3fr_1fr_1fr_auto]"
          aria-label="Filter the audit log"
          onSubmit={(event) => {
            event.preventDefault();
            const form = new FormData(event.currentTarget);
            const next = new URLSearchParams();
            for (const key of ["userId", "action", "from", "to"]) {
              const value = form.get(key);
              if (typeof value === "string" && value !== "") next.set(key, value);
            }
            setParams(next);
          }}
        >
          <div>
            <label htmlFor="audit-person" className="block text-sm font-semibold">
              Person (acted, or was acted on)
            </label>
            <select id="audit-person" name="userId" defaultValue={filters.userId ?? ""} key={`p-${filters.userId ?? ""}`} className={inputClass}>
              <option value="">Everyone</option>
              {[...users]
                .sort((a, b) => a.name.localeCompare(b.name))
                .map((user) => (
                  <option key={user.id} value={user.id}>
                    {user.name} ({user.email})
                  </option>
                ))}
            </select>
          </div>
          <div>
            <label htmlFor="audit-action" className="block text-sm font-semibold">
              Action
            </label>
            <select id="audit-action" name="action" defaultValue={filters.action ?? ""} key={`a-${filters.action ?? ""}`} className={inputClass}>
              <option value="">Every action</option>
              {AUDIT_ACTIONS.map((action) => (
                <option key={action} value={action}>
                  {AUDIT_ACTION_LABELS[action]}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label htmlFor="audit-from" className="block text-sm font-semibold">
              From (UTC day)
            </label>
            <input id="audit-from" name="from" type="date" defaultValue={filters.from ?? ""} key={`f-${filters.from ?? ""}`} className={inputClass} />
          </div>
          <div>
            <label htmlFor="audit-to" className="block text-sm font-semibold">
              To (UTC day, included)
            </label>
            <input id="audit-to" name="to" type="date" defaultValue={filters.to ?? ""} key={`t-${filters.to ?? ""}`} className={inputClass} />
          </div>
          <div className="flex items-end gap-2">
            <button type="submit" className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong">
              Show
            </button>
            {filtered ? (
              <button type="button" onClick={() => setParams(new URLSearchParams())} className="rounded-md border border-line px-3 py-1.5 font-semibold">
                Clear
              </button>
            ) : null}
          </div>
        </form>

        {data.rows.length === 0 ? (
          <Notice title={filtered ? "No rows match these filters" : "Nothing recorded yet"}>
            {filtered ? "Widen the dates, choose every action or everyone, or clear the filters." : "Every sign-in and change will be listed here as it happens."}
          </Notice>
        ) : (
          <div className="overflow-hidden rounded-lg border border-line bg-panel">
            {/* Narrow screens: one block per row, so the sentence is never cut off at the edge. */}
            <ol className="divide-y divide-line text-sm md:hidden" aria-label="Audit log rows, newest first">
              {data.rows.map((row) => (
                <li key={row.id} className="space-y-0.5 px-3 py-2">
                  <p className="flex flex-wrap justify-between gap-x-3">
                    <span className="font-semibold">{AUDIT_ACTION_LABELS[row.action]}</span>
                    <span className="tabular-nums text-ink-soft">{formatDateTimeUtc(row.at)}</span>
                  </p>
                  <p className="break-words">{row.summary}</p>
                  <p className="text-ink-soft">
                    By{" "}
                    {row.actor ? (
                      <Link to={`/admin/people/${encodeURIComponent(row.actor.id)}`} className="text-accent underline-offset-2 hover:underline">
                        {row.actor.name}
                      </Link>
                    ) : row.action === "auth.sign_in_failed" ? (
                      "someone not signed in"
                    ) : (
                      "Calmcrest"
                    )}
                  </p>
                </li>
              ))}
            </ol>
            <div className="hidden overflow-x-auto md:block">
              <table className="w-full border-collapse text-sm">
                <caption className="sr-only">Audit log rows, newest first</caption>
                <thead className="bg-paper text-left">
                  <tr>
                    <th scope="col" className="border-b border-line px-3 py-2 font-semibold">
                      When (UTC)
                    </th>
                    <th scope="col" className="border-b border-line px-3 py-2 font-semibold">
                      Who
                    </th>
                    <th scope="col" className="border-b border-line px-3 py-2 font-semibold">
                      Action
                    </th>
                    <th scope="col" className="border-b border-line px-3 py-2 font-semibold">
                      What
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {data.rows.map((row) => (
                    <tr key={row.id} className="border-b border-line align-top last:border-b-0">
                      <td className="whitespace-nowrap px-3 py-2 tabular-nums">{formatDateTimeUtc(row.at).replace(" UTC", "")}</td>
                      <td className="px-3 py-2">
                        {row.actor ? (
                          <Link to={`/admin/people/${encodeURIComponent(row.actor.id)}`} className="text-accent underline-offset-2 hover:underline">
                            {row.actor.name}
                          </Link>
                        ) : (
                          <span className="text-ink-soft">{row.action === "auth.sign_in_failed" ? "Not signed in" : "Calmcrest"}</span>
                        )}
                      </td>
                      <td className="px-3 py-2 font-semibold">{AUDIT_ACTION_LABELS[row.action]}</td>
                      <td className="min-w-[14rem] break-words px-3 py-2">{row.summary}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <nav aria-label="Pages of the audit log" className="flex flex-wrap items-center justify-between gap-2 border-t border-line px-3 py-2 text-sm">
              <span className="text-ink-soft">
                Rows {first}–{last} of {data.total}
              </span>
              <span className="flex gap-2">
                <button type="button" className="rounded-md border border-line px-3 py-1 font-semibold disabled:opacity-50" disabled={data.page <= 1} onClick={() => goTo(data.page - 1)}>
                  Newer
                </button>
                <span className="self-center">
                  Page {data.page} of {pages}
                </span>
                <button type="button" className="rounded-md border border-line px-3 py-1 font-semibold disabled:opacity-50" disabled={data.page >= pages} onClick={() => goTo(data.page + 1)}>
                  Older
                </button>
              </span>
            </nav>
          </div>
        )}
      </div>
    </Page>
  );
}
