import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useQuery } from "@tanstack/react-query";
import { Link, useNavigate, useSearchParams } from "react-router-dom";
import { PASSWORD_RULES_TEXT, passwordProblems, setPasswordSchema, type SetPasswordInput } from "@calmcrest/contracts";
import { passwordLinkQuery, setPassword } from "../api/auth";
import { ApiError } from "../api/client";
import { Logo } from "../components/logo";
import { formatDateTimeUtc } from "../lib/format";

/** The frame of the signed-out pages (sign-in, choosing a password, asking for a reset). */
export function SignedOutFrame({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <main className="flex min-h-full items-center justify-center bg-night px-4 py-10">
      <div className="w-full max-w-md rounded-xl bg-panel p-7 shadow-lg">
        <div className="mb-6 flex items-center gap-3">
          <Logo className="h-9 w-9" />
          <div>
            <p className="text-xl font-semibold">Calmcrest</p>
            <p className="text-sm text-ink-soft">Seeing statistics for site surveys</p>
          </div>
        </div>
        <h1 className="mb-4 text-lg font-semibold">{title}</h1>
        {children}
      </div>
    </main>
  );
}

/** /set-password?token=…: the page an invitation or reset e-mail links to. */
export function SetPasswordPage() {
  const [params] = useSearchParams();
  const token = params.get("token") ?? "";
  const navigate = useNavigate();
  const link = useQuery({ ...passwordLinkQuery(token), enabled: token !== "" });
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState, setError } = useForm<SetPasswordInput>({ resolver: zodResolver(setPasswordSchema) });

  if (token === "") {
    return (
      <SignedOutFrame title="This link is incomplete">
        <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">The address has no link code. Open the whole link from the e-mail, or ask an administrator for a new one.</p>
      </SignedOutFrame>
    );
  }
  if (link.isPending) {
    return (
      <SignedOutFrame title="Checking the link…">
        <p role="status" className="text-ink-soft">One moment.</p>
      </SignedOutFrame>
    );
  }
  if (link.isError || !link.data) {
    const message = link.error instanceof ApiError ? link.error.message : "The link could not be checked. Try again in a moment.";
    return (
      <SignedOutFrame title="This link cannot be used">
        <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
          {message}
        </p>
        <p className="mt-4 flex flex-wrap gap-4 text-sm">
          <Link to="/sign-in" className="font-semibold text-accent underline-offset-2 hover:underline">
            Go to sign-in
          </Link>
          <Link to="/reset-password" className="font-semibold text-accent underline-offset-2 hover:underline">
            Ask for a new password link
          </Link>
        </p>
      </SignedOutFrame>
    );
  }
  const info = link.data;
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    // The same rules the server checks, so most problems show before sending.
    const problems = passwordProblems(input.password, info);
    if (problems.length > 0) {
      setError("password", { message: problems.join(" ") });
      return;
    }
    try {
      const done = await setPassword(token, input);
      await navigate(`/sign-in?password=set&email=${encodeURIComponent(done.email)}`, { replace: true });
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "The password could not be saved. Try again.");
    }
  });
  return (
    <SignedOutFrame title={info.purpose === "invite" ? `Welcome, ${info.name}: choose your password` : "Choose a new password"}>
      <p className="mb-4 text-sm text-ink-soft">
        For the account <strong className="text-ink">{info.email}</strong>. This link works once, until {formatDateTimeUtc(info.expiresAt)}.
      </p>
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        {/* The e-mail in a hidden field helps password managers store the new password under the right account. */}
        <input type="email" name="username" autoComplete="username" value={info.email} readOnly hidden />
        <div>
          <label htmlFor="new-password" className="block text-sm font-semibold">
            New password
          </label>
          <p id="new-password-rules" className="mt-0.5 text-xs text-ink-soft">
            {PASSWORD_RULES_TEXT}
          </p>
          <input
            id="new-password"
            type="password"
            autoComplete="new-password"
            className="mt-1 w-full rounded-md border border-line px-3 py-2"
            aria-invalid={formState.errors.password ? true : undefined}
            aria-describedby={formState.errors.password ? "new-password-rules new-password-error" : "new-password-rules"}
            {...register("password")}
          />
          {formState.errors.password ? (
            <p id="new-password-error" className="mt-1 text-sm text-bad">
              {formState.errors.password.message}
            </p>
          ) : null}
        </div>
        {failure ? (
          <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
            {failure}
          </p>
        ) : null}
        <button type="submit" disabled={formState.isSubmitting} className="w-full rounded-md bg-accent px-4 py-2 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
          {formState.isSubmitting ? "Saving…" : "Save the password"}
        </button>
      </form>
    </SignedOutFrame>
  );
}
