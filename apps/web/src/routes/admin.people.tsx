import { useCallback, useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useSuspenseQuery } from "@tanstack/react-query";
import { Link } from "react-router-dom";
import { inviteSchema, ROLE_LABELS, ROLES, type InviteFormInput, type InviteInput, type UserListItem } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { useAddMember, useInviteUser, useRemoveMember } from "../api/mutations";
import { usersQuery } from "../api/users";
import { useVisibleCampaigns } from "../api/visible-campaigns";
import { Page, Problem } from "../components/page";
import { ChangeRoleButton, SavedBanner, StatusBadge, messageOf, roleLock, type SavedNote } from "../components/people";
import { formatDateTimeUtc } from "../lib/format";

type Report = (note: Omit<SavedNote, "id">) => void;

function MembershipCell({ user, onSaved, onProblem }: { user: UserListItem; onSaved: Report; onProblem: (message: string | null) => void }) {
  const addMember = useAddMember();
  const removeMember = useRemoveMember();
  const { campaigns } = useVisibleCampaigns();
  const [choice, setChoice] = useState("");
  const available = campaigns.filter((campaign) => !user.campaigns.some((member) => member.id === campaign.id));
  const run = async (action: () => Promise<unknown>, failure: string, note: Omit<SavedNote, "id">) => {
    onProblem(null);
    try {
      await action();
      onSaved(note);
    } catch (error) {
      onProblem(messageOf(error, failure));
    }
  };
  // Only field engineers' access depends on membership; say what the other roles see instead of offering controls.
  if (user.role !== "engineer" && user.campaigns.length === 0) {
    return <p className="text-ink-soft">{user.role === "committee" ? "Published reports only, no campaign data" : "Every campaign (by role)"}</p>;
  }
  return (
    <div className="space-y-1">
      {user.campaigns.length === 0 ? <p className="text-ink-soft">No campaigns yet: sees no sites until added to one.</p> : null}
      <ul className="space-y-1">
        {user.campaigns.map((campaign) => (
          <li key={campaign.id} className="flex flex-wrap items-center justify-between gap-2">
            <span className="min-w-0 break-words">
              {campaign.siteName} — {campaign.name}
            </span>
            <button
              type="button"
              aria-label={`Remove ${user.name} from ${campaign.name}`}
              onClick={() =>
                void run(() => removeMember.mutateAsync({ campaignId: campaign.id, userId: user.id }), "The membership could not be removed.", {
                  text: `${user.name} no longer has access to ${campaign.siteName} — ${campaign.name}.`,
                  undo: async () => {
                    await addMember.mutateAsync({ campaignId: campaign.id, userId: user.id });
                  },
                })
              }
              className="rounded border border-line px-2 py-0.5 text-xs font-semibold hover:bg-bad-pale"
            >
              Remove
            </button>
          </li>
        ))}
      </ul>
      {available.length > 0 ? (
        <div className="flex flex-wrap gap-2">
          <select aria-label={`Campaign to add ${user.name} to`} value={choice} onChange={(event) => setChoice(event.target.value)} className="min-w-0 flex-1 rounded-md border border-line bg-panel px-2 py-1 text-sm">
            <option value="">Add to campaign…</option>
            {available.map((campaign) => (
              <option key={campaign.id} value={String(campaign.id)}>
                {campaign.siteName} — {campaign.name}
              </option>
            ))}
          </select>
          <button
            type="button"
            disabled={choice === ""}
            onClick={() => {
              const campaignId = Number(choice);
              const campaign = available.find((candidate) => candidate.id === campaignId);
              void run(
                async () => {
                  await addMember.mutateAsync({ campaignId, userId: user.id });
                  setChoice("");
                },
                "The membership could not be added.",
                {
                  text: `${user.name} now has access to ${campaign ? `${campaign.siteName} — ${campaign.name}` : "the campaign"}.`,
                  undo: async () => {
                    await removeMember.mutateAsync({ campaignId, userId: user.id });
                  },
                },
              );
            }}
            className="rounded-md border border-accent px-2 py-1 text-sm font-semibold text-accent disabled:opacity-50"
          >
            Add
          </button>
        </div>
      ) : null}
    </div>
  );
}

function InvitePerson({ onSaved }: { onSaved: Report }) {
  const invite = useInviteUser();
  const { campaigns } = useVisibleCampaigns();
  const [failure, setFailure] = useState<string | null>(null);
  // The campaign boxes are kept here (a form library reads one checkbox as true/false, several as a list).
  const [campaignIds, setCampaignIds] = useState<number[]>([]);
  const { register, handleSubmit, formState, reset, watch } = useForm<InviteFormInput, unknown, InviteInput>({ resolver: zodResolver(inviteSchema), defaultValues: { role: "engineer", campaignIds: [] } });
  const role = watch("role");
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      const user = await invite.mutateAsync({ ...input, campaignIds: input.role === "engineer" ? campaignIds : [] });
      reset({ role: "engineer", email: "", name: "", campaignIds: [] });
      setCampaignIds([]);
      onSaved({ text: `Invitation sent to ${user.name} <${user.email}>. The link works once, for 72 hours; they choose their own password (the Outbox shows the message).` });
    } catch (error) {
      setFailure(messageOf(error, "The invitation could not be sent. Try again."));
    }
  });
  const fields = [
    ["name", "Name", "text", "off"],
    ["email", "E-mail", "email", "off"],
  ] as const;
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-3 rounded-lg border border-line bg-panel p-4" aria-labelledby="invite-heading">
      <h2 id="invite-heading" className="text-lg font-semibold">
        Invite a person
      </h2>
      <p className="text-sm text-ink-soft">They get an e-mail with a link that works once, for 72 hours, to choose their own password. Nobody else ever sees it.</p>
      <div className="grid gap-3 md:grid-cols-3">
        {fields.map(([name, label, type, autoComplete]) => (
          <div key={name}>
            <label htmlFor={`invite-${name}`} className="block text-sm font-semibold">
              {label}
            </label>
            <input id={`invite-${name}`} type={type} autoComplete={autoComplete} aria-invalid={formState.errors[name] ? true : undefined} className="mt-1 w-full rounded-md border border-line px-2 py-1.5" {...register(name)} />
            {formState.errors[name] ? <p className="mt-1 text-xs text-bad">{formState.errors[name]?.message}</p> : null}
          </div>
        ))}
        <div>
          <label htmlFor="invite-role" className="block text-sm font-semibold">
            Role
          </label>
          <select id="invite-role" className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" {...register("role")}>
            {ROLES.map((option) => (
              <option key={option} value={option}>
                {ROLE_LABELS[option]}
              </option>
            ))}
          </select>
        </div>
      </div>
      {role === "engineer" ? (
        <fieldset>
          <legend className="text-sm font-semibold">Campaigns they work on (field engineers see only these)</legend>
          {campaigns.length === 0 ? (
            <p className="text-sm text-ink-soft">No campaigns yet: a survey lead creates them on a site's page. You can add the person to campaigns later.</p>
          ) : (
            <div className="mt-1 grid gap-1 sm:grid-cols-2 lg:grid-cols-3">
              {campaigns.map((campaign) => (
                <label key={campaign.id} className="flex items-center gap-2 text-sm">
                  <input
                    type="checkbox"
                    checked={campaignIds.includes(campaign.id)}
                    onChange={(event) => setCampaignIds((ids) => (event.target.checked ? [...ids, campaign.id] : ids.filter((id) => id !== campaign.id)))}
                  />
                  {campaign.siteName} — {campaign.name}
                </label>
              ))}
            </div>
          )}
        </fieldset>
      ) : null}
      <button type="submit" disabled={formState.isSubmitting} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
        Send invitation
      </button>
      <Problem text={failure} />
    </form>
  );
}

/** Column heads of the people list, shown where the rows sit side by side (wide screens). */
const GRID = "lg:grid lg:grid-cols-[minmax(10rem,1.1fr)_minmax(12rem,1.2fr)_minmax(11rem,1fr)_minmax(16rem,1.6fr)_minmax(8rem,0.7fr)] lg:gap-4";

function PersonRow({ user, everyone, meId, onSaved, onProblem }: { user: UserListItem; everyone: UserListItem[]; meId: string | undefined; onSaved: Report; onProblem: (message: string | null) => void }) {
  const label = "text-xs font-semibold uppercase tracking-wide text-ink-soft lg:sr-only";
  return (
    <li className={`space-y-3 border-b border-line px-4 py-3 last:border-b-0 sm:grid sm:grid-cols-2 sm:gap-x-6 sm:gap-y-3 sm:space-y-0 ${GRID}`} aria-label={user.name}>
      <div className="sm:col-span-2 lg:col-span-1">
        <Link to={`/admin/people/${encodeURIComponent(user.id)}`} className="font-semibold text-accent underline-offset-2 hover:underline">
          {user.name}
        </Link>
        {user.id === meId ? <span className="text-ink-soft"> (you)</span> : null}
        <StatusBadge status={user.status} />
      </div>
      <div className="min-w-0 break-words">
        <p className={label}>E-mail</p>
        {user.email}
      </div>
      <div>
        <p className={label}>Role</p>
        <ChangeRoleButton user={user} isSelf={user.id === meId} lock={roleLock(user, everyone)} onSaved={onSaved} onProblem={onProblem} />
      </div>
      <div>
        <p className={label}>Campaign access</p>
        <MembershipCell user={user} onSaved={onSaved} onProblem={onProblem} />
      </div>
      <div>
        <p className={label}>Last sign-in</p>
        <span className="tabular-nums">{user.lastSignInAt ? formatDateTimeUtc(user.lastSignInAt) : "Never"}</span>
      </div>
    </li>
  );
}

export function PeoplePage() {
  const { data: users } = useSuspenseQuery(usersQuery);
  const { data: me } = useSuspenseQuery(meQuery);
  const [problem, setProblem] = useState<string | null>(null);
  const [note, setNote] = useState<SavedNote | null>(null);
  const onSaved = useCallback((saved: Omit<SavedNote, "id">) => setNote({ ...saved, id: Date.now() }), []);
  const clearNote = useCallback(() => setNote(null), []);
  return (
    <Page
      title="People and access"
      intro="Who can sign in, in which role, and which campaigns each field engineer works on. Engineers see and upload to their campaigns only; survey leads see every campaign. Open a person for their account: e-mail, sessions, deactivation and their recent actions."
      actions={
        <Link to="/admin/audit" className="rounded-md border border-line bg-panel px-3 py-1.5 text-sm font-semibold text-accent hover:bg-accent-pale">
          Audit log
        </Link>
      }
    >
      <div className="space-y-4">
        <Problem text={problem} />
        <SavedBanner note={note} onDone={clearNote} onProblem={setProblem} />
        <section aria-labelledby="people-heading" className="overflow-hidden rounded-lg border border-line bg-panel">
          <h2 id="people-heading" className="sr-only">
            People with a Calmcrest account
          </h2>
          <div aria-hidden="true" className={`hidden border-b border-line bg-paper px-4 py-2 text-sm font-semibold ${GRID}`}>
            <span>Name</span>
            <span>E-mail</span>
            <span>Role</span>
            <span>Campaign access</span>
            <span>Last sign-in (UTC)</span>
          </div>
          <ul>
            {[...users]
              .sort((a, b) => a.name.localeCompare(b.name))
              .map((user) => (
                <PersonRow key={user.id} user={user} everyone={users} meId={me?.id} onSaved={onSaved} onProblem={setProblem} />
              ))}
          </ul>
        </section>
        <InvitePerson onSaved={onSaved} />
      </div>
    </Page>
  );
}
