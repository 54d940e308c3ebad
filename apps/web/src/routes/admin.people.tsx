import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useQueryClient, useSuspenseQuery } from "@tanstack/react-query";
import { createColumnHelper } from "@tanstack/react-table";
import { createUserSchema, ROLE_LABELS, ROLES, type CreateUserInput, type Role, type UserListItem } from "@calmcrest/contracts";
import { meQuery } from "../api/auth";
import { addMember, removeMember } from "../api/campaigns";
import { ApiError } from "../api/client";
import { createUser, patchUser, usersQuery } from "../api/users";
import { useVisibleCampaigns } from "../api/visible-campaigns";
import { DataTable } from "../components/data-table";
import { Page } from "../components/page";
import { formatDateUtc } from "../lib/format";

const messageOf = (error: unknown, fallback: string) => (error instanceof ApiError ? error.message : fallback);

function useRefreshPeople() {
  const queryClient = useQueryClient();
  // Membership decides what engineers see, so sites and campaigns are refreshed with the user list.
  return async () => {
    await Promise.all([
      queryClient.invalidateQueries({ queryKey: ["users"] }),
      queryClient.invalidateQueries({ queryKey: ["campaigns"] }),
      queryClient.invalidateQueries({ queryKey: ["sites"] }),
    ]);
  };
}

function RoleCell({ user, onProblem }: { user: UserListItem; onProblem: (message: string | null) => void }) {
  const refresh = useRefreshPeople();
  const { data: me } = useSuspenseQuery(meQuery);
  return (
    <select
      aria-label={`Role of ${user.name}`}
      value={user.role}
      // Admins cannot demote themselves here: the last admin locking everyone out is hard to undo.
      disabled={me?.id === user.id}
      onChange={async (event) => {
        onProblem(null);
        try {
          await patchUser(user.id, { role: event.target.value as Role });
          await refresh();
        } catch (error) {
          onProblem(messageOf(error, "The role could not be changed. Try again."));
        }
      }}
      className="rounded-md border border-line bg-panel px-2 py-1"
    >
      {ROLES.map((role) => (
        <option key={role} value={role}>
          {ROLE_LABELS[role]}
        </option>
      ))}
    </select>
  );
}

function MembershipCell({ user, onProblem }: { user: UserListItem; onProblem: (message: string | null) => void }) {
  const refresh = useRefreshPeople();
  const { campaigns } = useVisibleCampaigns();
  const [choice, setChoice] = useState("");
  const available = campaigns.filter((campaign) => !user.campaigns.some((member) => member.id === campaign.id));
  const run = async (action: () => Promise<unknown>, failure: string) => {
    onProblem(null);
    try {
      await action();
      await refresh();
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
          <li key={campaign.id} className="flex items-center justify-between gap-2">
            <span>
              {campaign.siteName} — {campaign.name}
            </span>
            <button
              type="button"
              aria-label={`Remove ${user.name} from ${campaign.name}`}
              onClick={() => void run(() => removeMember(campaign.id, user.id), "The membership could not be removed.")}
              className="rounded border border-line px-2 py-0.5 text-xs font-semibold hover:bg-bad-pale"
            >
              Remove
            </button>
          </li>
        ))}
      </ul>
      {available.length > 0 ? (
        <div className="flex gap-2">
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
            onClick={() => void run(async () => {
              await addMember(Number(choice), { userId: user.id });
              setChoice("");
            }, "The membership could not be added.")}
            className="rounded-md border border-accent px-2 py-1 text-sm font-semibold text-accent disabled:opacity-50"
          >
            Add
          </button>
        </div>
      ) : null}
    </div>
  );
}

function NewPerson() {
  const refresh = useRefreshPeople();
  const [failure, setFailure] = useState<string | null>(null);
  const [created, setCreated] = useState<string | null>(null);
  const { register, handleSubmit, formState, reset } = useForm<CreateUserInput>({ resolver: zodResolver(createUserSchema), defaultValues: { role: "engineer" } });
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    setCreated(null);
    try {
      const user = await createUser(input);
      reset({ role: "engineer", email: "", name: "", password: "" });
      setCreated(`${user.name} can now sign in as ${user.email}. Give them the first password by a separate channel.`);
      await refresh();
    } catch (error) {
      setFailure(messageOf(error, "The account could not be created. Try again."));
    }
  });
  const fields = [
    ["name", "Name", "text", "name"],
    ["email", "E-mail", "email", "off"],
    ["password", "First password", "password", "new-password"],
  ] as const;
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-3 rounded-lg border border-line bg-panel p-4" aria-labelledby="new-person-heading">
      <h2 id="new-person-heading" className="text-lg font-semibold">
        Add a person
      </h2>
      <div className="grid gap-3 md:grid-cols-4">
        {fields.map(([name, label, type, autoComplete]) => (
          <div key={name}>
            <label htmlFor={`new-${name}`} className="block text-sm font-semibold">
              {label}
            </label>
            <input id={`new-${name}`} type={type} autoComplete={autoComplete} aria-invalid={formState.errors[name] ? true : undefined} className="mt-1 w-full rounded-md border border-line px-2 py-1.5" {...register(name)} />
            {formState.errors[name] ? <p className="mt-1 text-xs text-bad">{formState.errors[name]?.message}</p> : null}
          </div>
        ))}
        <div>
          <label htmlFor="new-role" className="block text-sm font-semibold">
            Role
          </label>
          <select id="new-role" className="mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5" {...register("role")}>
            {ROLES.map((role) => (
              <option key={role} value={role}>
                {ROLE_LABELS[role]}
              </option>
            ))}
          </select>
        </div>
      </div>
      <button type="submit" disabled={formState.isSubmitting} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
        Create account
      </button>
      {failure ? (
        <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
          {failure}
        </p>
      ) : null}
      {created ? (
        <p role="status" className="rounded-md bg-accent-pale px-3 py-2 text-sm text-accent-strong">
          {created}
        </p>
      ) : null}
    </form>
  );
}

export function PeoplePage() {
  const { data: users } = useSuspenseQuery(usersQuery);
  const [problem, setProblem] = useState<string | null>(null);
  const column = createColumnHelper<UserListItem>();
  const columns = [
    column.accessor("name", { header: "Name", cell: (cell) => <span className="font-semibold">{cell.getValue()}</span> }),
    column.accessor("email", { header: "E-mail" }),
    column.accessor("role", { header: "Role", cell: (cell) => <RoleCell user={cell.row.original} onProblem={setProblem} /> }),
    column.accessor((user) => user.campaigns.length, { id: "campaigns", header: "Campaign access", cell: (cell) => <MembershipCell user={cell.row.original} onProblem={setProblem} /> }),
    column.accessor("createdAt", { header: "Since", cell: (cell) => <span className="tabular-nums">{formatDateUtc(cell.getValue())}</span> }),
  ];
  return (
    <Page title="People and access" intro="Who can sign in, in which role, and which campaigns each field engineer works on. Engineers see and upload to their campaigns only; survey leads see every campaign.">
      <div className="space-y-6">
        {problem ? (
          <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
            {problem}
          </p>
        ) : null}
        <DataTable caption="People with a Calmcrest account" columns={columns} data={users} initialSorting={[{ id: "name", desc: false }]} getRowId={(user) => user.id} />
        <NewPerson />
      </div>
    </Page>
  );
}
