import { useState } from "react";
import { useSuspenseQuery } from "@tanstack/react-query";
import { ROLE_LABELS } from "@calmcrest/contracts";
import { useNavigate } from "react-router-dom";
import { meQuery } from "../api/auth";
import { ConfirmButton } from "../components/people";
import { ApiError } from "../api/client";
import { useSetPreferences, useSignOutEverywhere } from "../api/mutations";
import { preferencesQuery } from "../api/reports";
import { Page } from "../components/page";

/** /account: the signed-in person's own settings (for now: which e-mails they get). */
export function AccountPage() {
  const { data: me } = useSuspenseQuery(meQuery);
  const { data: preferences } = useSuspenseQuery(preferencesQuery);
  const setPreferences = useSetPreferences();
  const signOutEverywhere = useSignOutEverywhere();
  const navigate = useNavigate();
  const [problem, setProblem] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  if (!me) return null;
  return (
    <Page title="Your account" intro={`${me.name} · ${me.email} · ${ROLE_LABELS[me.role]}`}>
      <fieldset className="max-w-2xl space-y-3 rounded-lg border border-line bg-panel p-4">
        <legend className="px-1 font-semibold">E-mail</legend>
        <label className="flex items-start gap-3">
          <input
            type="checkbox"
            className="mt-1"
            checked={preferences.commentEmails}
            onChange={async (event) => {
              setProblem(null);
              setSaved(false);
              try {
                await setPreferences.mutateAsync({ commentEmails: event.target.checked });
                setSaved(true);
              } catch (error) {
                setProblem(error instanceof ApiError ? error.message : "The setting could not be saved. Try again.");
              }
            }}
          />
          <span>
            <span className="block font-semibold">Comment e-mails</span>
            <span className="text-sm text-ink-soft">
              New comments on reports you lead, replies in threads you take part in, and threads being resolved. E-mails about a report version being published always come.
            </span>
          </span>
        </label>
        {saved ? (
          <p role="status" className="text-sm text-good">
            Saved.
          </p>
        ) : null}
        {problem ? (
          <p role="alert" className="text-sm text-bad">
            {problem}
          </p>
        ) : null}
      </fieldset>
      <section aria-labelledby="sessions-heading" className="mt-6 max-w-2xl space-y-3 rounded-lg border border-line bg-panel p-4">
        <h2 id="sessions-heading" className="font-semibold">
          Sessions and password
        </h2>
        <p className="text-sm text-ink-soft">
          Signed in on a computer you no longer use, or lost a phone? Sign out everywhere ends every session of your account, this one too. To change your password, sign out and use
          “Forgotten your password?” on the sign-in page.
        </p>
        <ConfirmButton
          label="Sign out everywhere"
          title="Sign out on every device?"
          consequences={<p>Every session of {me.email} ends at once, including this one; you sign in again here afterwards.</p>}
          confirmLabel="Sign out everywhere"
          action={async () => {
            await signOutEverywhere.mutateAsync();
            await navigate("/sign-in", { replace: true });
          }}
        />
      </section>
    </Page>
  );
}
