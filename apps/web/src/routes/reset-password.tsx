import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { Link } from "react-router-dom";
import { resetRequestSchema, type ResetRequestInput } from "@calmcrest/contracts";
import { requestPasswordReset } from "../api/auth";
import { ApiError } from "../api/client";
import { SignedOutFrame } from "./set-password";

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
          <div>
            <label htmlFor="reset-email" className="block text-sm font-semibold">
              E-mail
            </label>
            <input id="reset-email" type="email" autoComplete="username" className="mt-1 w-full rounded-md border border-line px-3 py-2" aria-invalid={formState.errors.email ? true : undefined} {...register("email")} />
            {formState.errors.email ? <p className="mt-1 text-sm text-bad">{formState.errors.email.message}</p> : null}
          </div>
          {failure ? (
            <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
              {failure}
            </p>
          ) : null}
          <button type="submit" disabled={formState.isSubmitting} className="w-full rounded-md bg-accent px-4 py-2 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
            Send me a link
          </button>
        </form>
      )}
      <p className="mt-4 text-sm">
        <Link to="/sign-in" className="font-semibold text-accent underline-offset-2 hover:underline">
          Back to sign-in
        </Link>
      </p>
    </SignedOutFrame>
  );
}
