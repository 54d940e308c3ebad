import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { resetRequestSchema, type ResetRequestInput } from "@calmcrest/contracts";
import { requestPasswordReset } from "../api/auth";
import { ApiError } from "../api/client";
import { Problem } from "../components/page";
import { SignedOutField, SignedOutFrame, SignedOutLink, SignedOutSubmit } from "../components/signed-out";

/** /reset-password: ask for a link to choose a new password (the answer never says whether the address has an account). */
export function ResetPasswordPage() {
  const [done, setDone] = useState<string | null>(null);
  const [failure, setFailure] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm<ResetRequestInput>({ resolver: zodResolver(resetRequestSchema) });
  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      setDone((await requestPasswordReset(input)).message);
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "The request could not be sent. Try again.");
    }
  });
  return (
    <SignedOutFrame title="Forgotten password">
      {done ? (
        <p role="status" className="rounded-md bg-accent-pale px-3 py-2 text-sm text-accent-strong">
          {done}
        </p>
      ) : (
        <form onSubmit={onSubmit} noValidate className="space-y-4">
          <p className="text-sm text-ink-soft">Give the e-mail address of your Calmcrest account. You get a link to choose a new password; your current one keeps working until then.</p>
          <SignedOutField id="reset-email" label="E-mail" type="email" autoComplete="username" error={formState.errors.email?.message} registration={register("email")} />
          <Problem text={failure} />
          <SignedOutSubmit busy={formState.isSubmitting} label="Send me a link" busyLabel="Sending…" />
        </form>
      )}
      <p className="mt-4 text-sm">
        <SignedOutLink to="/sign-in">
          Back to sign-in
        </SignedOutLink>
      </p>
    </SignedOutFrame>
  );
}
