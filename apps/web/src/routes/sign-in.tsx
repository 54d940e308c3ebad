import { useState } from "react";
import { useForm } from "react-hook-form";
import { zodResolver } from "@hookform/resolvers/zod";
import { useQueryClient } from "@tanstack/react-query";
import { Link, useNavigate, useSearchParams } from "react-router-dom";
import { signInSchema, type SignInInput } from "@calmcrest/contracts";
import { meQuery, signIn } from "../api/auth";
import { ApiError } from "../api/client";
import { homeFor, mayUse } from "../navigation";
import { Logo } from "../components/logo";

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
    <main className="flex min-h-full items-center justify-center bg-night px-4 py-10">
      <div className="w-full max-w-sm rounded-xl bg-panel p-7 shadow-lg">
        <div className="mb-6 flex items-center gap-3">
          <Logo className="h-9 w-9" />
          <div>
            <p className="text-xl font-semibold">Calmcrest</p>
            <p className="text-sm text-ink-soft">Seeing statistics for site surveys</p>
          </div>
        </div>
        <h1 className="mb-4 text-lg font-semibold">Sign in</h1>
        {passwordJustSet ? (
          <p role="status" className="mb-4 rounded-md bg-accent-pale px-3 py-2 text-sm text-accent-strong">
            Your password is saved. Sign in with it now.
          </p>
        ) : null}
        <form onSubmit={onSubmit} noValidate className="space-y-4">
          <div>
            <label htmlFor="email" className="block text-sm font-semibold">E-mail</label>
            <input
              id="email"
              type="email"
              autoComplete="username"
              className="mt-1 w-full rounded-md border border-line px-3 py-2"
              aria-invalid={formState.errors.email ? true : undefined}
              aria-describedby={formState.errors.email ? "email-error" : undefined}
              {...register("email")}
            />
            {formState.errors.email ? <p id="email-error" className="mt-1 text-sm text-bad">{formState.errors.email.message}</p> : null}
          </div>
          <div>
            <label htmlFor="password" className="block text-sm font-semibold">Password</label>
            <input
              id="password"
              type="password"
              autoComplete="current-password"
              className="mt-1 w-full rounded-md border border-line px-3 py-2"
              aria-invalid={formState.errors.password ? true : undefined}
              aria-describedby={formState.errors.password ? "password-error" : undefined}
              {...register("password")}
            />
            {formState.errors.password ? <p id="password-error" className="mt-1 text-sm text-bad">{formState.errors.password.message}</p> : null}
          </div>
          {failure ? (
            <p role="alert" className="rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">{failure}</p>
          ) : null}
          <button
            type="submit"
            disabled={formState.isSubmitting}
            className="w-full rounded-md bg-accent px-4 py-2 font-semibold text-white hover:bg-accent-strong disabled:opacity-60"
          >
            {formState.isSubmitting ? "Signing in…" : "Sign in"}
          </button>
        </form>
        <p className="mt-4 text-sm">
          <Link to="/reset-password" className="font-semibold text-accent underline-offset-2 hover:underline">
            Forgotten your password?
          </Link>
        </p>
      </div>
    </main>
  );
}
