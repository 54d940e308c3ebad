import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useQuery } from "@tanstack/react-query";
import { useNavigate, useSearchParams } from "react-router-dom";
import { PASSWORD_RULES_TEXT, passwordProblems, setPasswordSchema, type SetPasswordInput } from "@calmcrest/contracts";
import { passwordLinkQuery, setPassword } from "../api/auth";
import { ApiError } from "../api/client";
import { Problem } from "../components/page";
import { SignedOutField, SignedOutFrame, SignedOutLink, SignedOutSubmit } from "../components/signed-out";
import { formatDateTimeUtc } from "../lib/format";

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
        <Problem text="The address has no link code. Open the whole link from the e-mail, or ask an administrator for a new one." />
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
        <Problem text={message} />
        <p className="mt-4 flex flex-wrap gap-4 text-sm">
          <SignedOutLink to="/sign-in">
            Go to sign-in
          </SignedOutLink>
          <SignedOutLink to="/reset-password">
            Ask for a new password link
          </SignedOutLink>
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
        <SignedOutField
          id="new-password"
          label="New password"
          type="password"
          autoComplete="new-password"
          rules={PASSWORD_RULES_TEXT}
          error={formState.errors.password?.message}
          registration={register("password")}
        />
        <Problem text={failure} />
        <SignedOutSubmit busy={formState.isSubmitting} label="Save the password" busyLabel="Saving…" />
      </form>
    </SignedOutFrame>
  );
}
