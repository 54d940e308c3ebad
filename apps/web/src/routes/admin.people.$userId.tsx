import { useCallback, useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery } from "@tanstack/react-query";
import { Link, useParams } from "react-router-dom";
import { AUDIT_ACTION_LABELS, changeEmailSchema, ROLE_LABELS, type ChangeEmailInput } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { useChangeEmail, useDeactivateUser, useReactivateUser, useSendPasswordLink, useSignOutUserEverywhere } from "../api/mutations";
import { userQuery, usersQuery } from "../api/users";
import { Notice, Page, Problem } from "../components/page";
import { ChangeRoleButton, ConfirmButton, SavedBanner, StatusBadge, messageOf, roleLock, type SavedNote } from "../components/people";
import { formatDateTimeUtc } from "../lib/format";

function EmailForm({ userId, email, onSaved }: { userId: string; email: string; onSaved: (note: Omit<SavedNote, "id">) => void }) {
  const changeEmail = useChangeEmail(userId);
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState, reset } = useForm<ChangeEmailInput>({ resolver: zodResolver(changeEmailSchema), defaultValues: { email } });
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      const user = await changeEmail.mutateAsync(input);
      reset({ email: user.email });
      onSaved({
        text: `${user.name} now signs in as ${user.email}.`,
        undo: async () => {
          await changeEmail.mutateAsync({ email });
        },
      });
    } catch (error) {
      setFailure(messageOf(error, "The e-mail address could not be changed. Try again."));
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-2">
      <label htmlFor="person-email" className="block text-sm font-semibold">
        E-mail address (they sign in with it)
      </label>
      <div className="flex flex-wrap gap-2">
        <input id="person-email" type="email" autoComplete="off" aria-invalid={formState.errors.email ? true : undefined} className="min-w-0 flex-1 rounded-md border border-line px-2 py-1.5" {...register("email")} />
        <button type="submit" disabled={formState.isSubmitting || !formState.isDirty} className="rounded-md border border-accent px-3 py-1.5 text-sm font-semibold text-accent disabled:opacity-50">
          Change e-mail
        </button>
      </div>
      {formState.errors.email ? <p className="text-xs text-bad">{formState.errors.email.message}</p> : null}
      <Problem text={failure} />
    </form>
  );
}

export function PersonPage() {
  const userId = useParams().userId ?? "";
  const { data: person } = useSuspenseQuery(userQuery(userId));
  const { data: everyone } = useSuspenseQuery(usersQuery);
  const { data: me } = useSuspenseQuery(meQuery);
  const sendPasswordLink = useSendPasswordLink();
  const signOutEverywhere = useSignOutUserEverywhere();
  const deactivate = useDeactivateUser();
  const reactivate = useReactivateUser();
  const [problem, setProblem] = useState<string | null>(null);
  const [note, setNote] = useState<SavedNote | null>(null);
  const onSaved = useCallback((saved: Omit<SavedNote, "id">) => setNote({ ...saved, id: Date.now() }), []);
  const clearNote = useCallback(() => setNote(null), []);
  const isSelf = me?.id === person.id;

  const facts: [string, React.ReactNode][] = [
    ["E-mail", person.email],
    ["Role", <ChangeRoleButton key="role" user={person} isSelf={isSelf} lock={roleLock(person, everyone)} onSaved={onSaved} onProblem={setProblem} />],
    ["Account", person.status === "active" ? "Active" : person.status === "invited" ? "Invited, has not chosen a password yet" : "Deactivated: cannot sign in"],
    ["Last sign-in", person.lastSignInAt ? formatDateTimeUtc(person.lastSignInAt) : "Never"],
    ["Account since", formatDateTimeUtc(person.createdAt)],
  ];

  return (
    <Page
      title={person.name}
      intro={<Link to="/admin/people" className="text-accent underline-offset-2 hover:underline">← People and access</Link>}
      actions={<StatusBadge status={person.status} />}
    >
      <div className="space-y-6">
        <Problem text={problem} />
        <SavedBanner note={note} onDone={clearNote} onProblem={setProblem} />
        <div className="grid gap-6 lg:grid-cols-2">
          <section aria-labelledby="account-heading" className="space-y-3 rounded-lg border border-line bg-panel p-4">
            <h2 id="account-heading" className="text-lg font-semibold">
              Account
            </h2>
            <dl className="grid grid-cols-[minmax(6rem,auto)_1fr] gap-x-4 gap-y-2 text-sm">
              {facts.map(([term, value]) => (
                <div key={term} className="contents">
                  <dt className="font-semibold">{term}</dt>
                  <dd className="min-w-0 break-words">{value}</dd>
                </div>
              ))}
            </dl>
          </section>
          <section aria-labelledby="campaigns-heading" className="space-y-3 rounded-lg border border-line bg-panel p-4">
            <h2 id="campaigns-heading" className="text-lg font-semibold">
              Campaigns
            </h2>
            {person.campaigns.length > 0 ? (
              <ul className="ml-5 list-disc text-sm">
                {person.campaigns.map((campaign) => (
                  <li key={campaign.id}>
                    <Link to={`/campaigns/${campaign.id}`} className="text-accent underline-offset-2 hover:underline">
                      {campaign.siteName} — {campaign.name}
                    </Link>
                  </li>
                ))}
              </ul>
            ) : (
              <p className="text-sm text-ink-soft">
                {person.role === "engineer" ? "No campaigns: they see no sites. Add them to a campaign under People and access." : `None by membership: as ${ROLE_LABELS[person.role]} their role decides what they see.`}
              </p>
            )}
          </section>
        </div>

        <section aria-labelledby="manage-heading" className="space-y-4 rounded-lg border border-line bg-panel p-4">
          <h2 id="manage-heading" className="text-lg font-semibold">
            Manage the account
          </h2>
          <EmailForm key={person.email} userId={person.id} email={person.email} onSaved={onSaved} />
          <div className="flex flex-wrap gap-2">
            {person.status === "deactivated" ? null : (
              <ConfirmButton
                label={person.status === "invited" ? "Send a new invitation" : "Send a password reset link"}
                title={person.status === "invited" ? `Send ${person.name} a new invitation?` : `Send ${person.name} a password reset link?`}
                consequences={
                  <p>
                    {person.email} gets an e-mail with a link that works once ({person.status === "invited" ? "for 72 hours" : "for 2 hours"}) to choose {person.status === "invited" ? "their password" : "a new password"}. Links sent
                    earlier stop working.{person.status === "invited" ? "" : " Their current password keeps working until they choose a new one; then every session ends."}
                  </p>
                }
                confirmLabel="Send the e-mail"
                action={async () => {
                  const sent = await sendPasswordLink.mutateAsync(person.id);
                  onSaved({ text: `${sent.purpose === "invite" ? "A new invitation" : "A password reset link"} is on its way to ${person.email}, valid until ${formatDateTimeUtc(sent.expiresAt)}.` });
                }}
              />
            )}
            <ConfirmButton
              label="Sign out everywhere"
              title={`End every session of ${person.name}?`}
              consequences={<p>{person.name} is signed out on every browser and device at once and must sign in again. Nothing else changes.</p>}
              confirmLabel="End every session"
              action={async () => {
                await signOutEverywhere.mutateAsync(person.id);
                onSaved({ text: isSelf ? "Your other sessions ended; sign in again here." : `Every session of ${person.name} has ended.` });
              }}
            />
            {person.status === "deactivated" ? (
              <ConfirmButton
                label="Reactivate"
                title={`Reactivate ${person.name}?`}
                consequences={<p>{person.name} can sign in again with their password, with the role and campaigns they had ({ROLE_LABELS[person.role]}).</p>}
                confirmLabel="Reactivate"
                action={async () => {
                  await reactivate.mutateAsync(person.id);
                  onSaved({ text: `${person.name} can sign in again.` });
                }}
              />
            ) : isSelf ? (
              <p className="self-center text-sm text-ink-soft">You cannot deactivate your own account; another administrator can.</p>
            ) : person.lastActiveAdmin ? (
              <p className="self-center text-sm text-ink-soft">The last active administrator cannot be deactivated.</p>
            ) : (
              <ConfirmButton
                label="Deactivate…"
                tone="danger"
                title={`Deactivate ${person.name}?`}
                consequences={
                  <ul className="ml-5 list-disc space-y-1">
                    <li>Every session of {person.name} ends at once; they cannot sign in until reactivated.</li>
                    <li>Nothing is deleted: their uploads, exclusions and audit rows keep their name.</li>
                    <li>Their role and campaigns stay as they are, ready for a reactivation.</li>
                  </ul>
                }
                confirmLabel="Deactivate and end sessions"
                action={async () => {
                  await deactivate.mutateAsync(person.id);
                  onSaved({
                    text: `${person.name} is deactivated and signed out everywhere.`,
                    undo: async () => {
                      await reactivate.mutateAsync(person.id);
                    },
                  });
                }}
              />
            )}
          </div>
        </section>

        <section aria-labelledby="recent-heading" className="space-y-3">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <h2 id="recent-heading" className="text-lg font-semibold">
              Recent actions
            </h2>
            <Link to={`/admin/audit?userId=${encodeURIComponent(person.id)}`} className="text-sm text-accent underline-offset-2 hover:underline">
              Everything by or about {person.name} in the audit log
            </Link>
          </div>
          {person.recentActions.length === 0 ? (
            <Notice title="Nothing recorded yet">Sign-ins, changes and uploads by {person.name} will be listed here.</Notice>
          ) : (
            <ol className="divide-y divide-line rounded-lg border border-line bg-panel text-sm">
              {person.recentActions.map((row) => (
                <li key={row.id} className="flex flex-col gap-1 px-4 py-2 sm:flex-row sm:gap-4">
                  <span className="shrink-0 tabular-nums text-ink-soft sm:w-44">{formatDateTimeUtc(row.at)}</span>
                  <span className="shrink-0 font-semibold sm:w-48">{AUDIT_ACTION_LABELS[row.action]}</span>
                  <span className="min-w-0 break-words">
                    {row.summary}
                    {row.actor && row.actor.id !== person.id ? <span className="text-ink-soft"> (by {row.actor.name})</span> : null}
                  </span>
                </li>
              ))}
            </ol>
          )}
        </section>
      </div>
    </Page>
  );
}
