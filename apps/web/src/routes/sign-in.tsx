import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useQueryClient } from "@tanstack/react-query";
import { useNavigate, useSearchParams } from "react-router-dom";
import { signInSchema, type SignInInput } from "@calmcrest/contracts";
import { meQuery, signIn } from "../api/auth";
import { ApiError } from "../api/client";
import { homeFor, mayUse } from "../navigation";
import { Problem } from "../components/page";
import { SignedOutField, SignedOutFrame, SignedOutLink, SignedOutSubmit } from "../components/signed-out";

export function SignInPage() {
  const queryClient = useQueryClient();
  const navigate = useNavigate();
  const [searchParams] = useSearchParams();
  const [failure, setFailure] = useState<string | null>(null);
  // After choosing a password from an e-mail link the page says so and fills in the address.
  const passwordJustSet = searchParams.get("password") === "set";
  const { register, handleSubmit, formState } = useForm<SignInInput>({ resolver: zodResolver(signInSchema), defaultValues: { email: searchParams.get("email") ?? "" } });

  const onSubmit = handleSubmit(async (input) => {
    setFailure(null);
    try {
      const me = await signIn(input);
      queryClient.setQueryData(meQuery.queryKey, me);
      const next = searchParams.get("next");
      // Only follow `next` to a page inside the app that this role may use.
      const target = next && next.startsWith("/") && !next.startsWith("//") && mayUse(me.role, next.split("?")[0] ?? "") ? next : homeFor(me.role);
      await navigate(target, { replace: true });
    } catch (error) {
      setFailure(error instanceof ApiError ? error.message : "Signing in failed. Try again.");
    }
  });

  return (
    <SignedOutFrame title="Sign in" width="sm">
        {passwordJustSet ? (
          <p role="status" className="mb-4 rounded-md bg-accent-pale px-3 py-2 text-sm text-accent-strong">
            Your password is saved. Sign in with it now.
          </p>
        ) : null}
        <form onSubmit={onSubmit} noValidate className="space-y-4">
          <SignedOutField id="email" label="E-mail" type="email" autoComplete="username" error={formState.errors.email?.message} registration={register("email")} />
          <SignedOutField id="password" label="Password" type="password" autoComplete="current-password" error={formState.errors.password?.message} registration={register("password")} />
          <Problem text={failure} />
          <SignedOutSubmit busy={formState.isSubmitting} label="Sign in" busyLabel="Signing in…" />
        </form>
        <p className="mt-4 text-sm">
          <SignedOutLink to="/reset-password">
            Forgotten your password?
          </SignedOutLink>
        </p>
    </SignedOutFrame>
  );
}
