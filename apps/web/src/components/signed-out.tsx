import type { ReactNode } from "react";
import type { UseFormRegisterReturn } from "react-hook-form";
import { Link } from "react-router-dom";
import { Logo } from "./logo";

// The pieces of the signed-out pages (sign-in, choosing a password, asking for a reset), so they look and behave alike.

/** The frame: the logo and name, the page's heading, and its content on a card. */
export function SignedOutFrame({ title, width = "md", children }: { title: string; width?: "sm" | "md"; children: ReactNode }) {
  return (
    <main className="flex min-h-full items-center justify-center bg-night px-4 py-10">
      <div className={`w-full ${width === "sm" ? "max-w-sm" : "max-w-md"} rounded-xl bg-panel p-7 shadow-lg`}>
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

/**
 * A labelled e-mail or password box of a signed-out form, with its rule text (if any) and its problem under it,
 * both tied to the box for screen readers.
 */
export function SignedOutField({
  id,
  label,
  type,
  autoComplete,
  rules,
  error,
  registration,
}: {
  id: string;
  label: string;
  type: "email" | "password";
  autoComplete: "username" | "current-password" | "new-password";
  rules?: string;
  error?: string;
  registration: UseFormRegisterReturn;
}) {
  const describedBy = [rules ? `${id}-rules` : null, error ? `${id}-error` : null].filter((part) => part !== null).join(" ");
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-semibold">
        {label}
      </label>
      {rules ? (
        <p id={`${id}-rules`} className="mt-0.5 text-xs text-ink-soft">
          {rules}
        </p>
      ) : null}
      <input
        id={id}
        type={type}
        autoComplete={autoComplete}
        className="mt-1 w-full rounded-md border border-line px-3 py-2"
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy === "" ? undefined : describedBy}
        {...registration}
      />
      {error ? (
        <p id={`${id}-error`} className="mt-1 text-sm text-bad">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** The full-width submit button of a signed-out form. */
export function SignedOutSubmit({ busy, label, busyLabel }: { busy: boolean; label: string; busyLabel: string }) {
  return (
    <button type="submit" disabled={busy} className="w-full rounded-md bg-accent px-4 py-2 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
      {busy ? busyLabel : label}
    </button>
  );
}

/** A link under a signed-out form: to sign in, to ask for a new password link. */
export function SignedOutLink({ to, children }: { to: string; children: ReactNode }) {
  return (
    <Link to={to} className="font-semibold text-accent underline-offset-2 hover:underline">
      {children}
    </Link>
  );
}
