import type { ReactNode } from "react";
import type { UseFormRegisterReturn } from "react-hook-form";

// Shared pieces of the small site and campaign forms (create and edit), so they look and behave alike.

/**
 * Empty number boxes mean "not given" (undefined), not NaN, so optional settings stay optional.
 * React Hook Form also passes default values (numbers) through here, not only typed text.
 */
export const optionalNumber = (value: unknown) => (typeof value === "number" ? value : typeof value === "string" && value.trim() !== "" ? Number(value) : undefined);

/** Empty date boxes mean "no date" (undefined) rather than an empty string the date rule would refuse. */
export const optionalText = (value: unknown) => (typeof value === "string" && value.trim() !== "" ? value.trim() : undefined);

export function Field({ id, label, unit, error, children }: { id: string; label: string; unit?: string; error?: string; children: (props: { id: string; invalid: boolean }) => ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="block text-sm font-semibold">
        {label}
        {unit ? <span className="font-normal text-ink-soft"> ({unit})</span> : null}
      </label>
      {children({ id, invalid: Boolean(error) })}
      {error ? <p className="mt-1 text-xs text-bad">{error}</p> : null}
    </div>
  );
}

export const inputClass = "mt-1 w-full rounded-md border border-line bg-panel px-2 py-1.5";

export const numberInput = (id: string, invalid: boolean, registration: UseFormRegisterReturn, placeholder?: string) => (
  <input id={id} inputMode="decimal" placeholder={placeholder} aria-invalid={invalid || undefined} className={`${inputClass} text-right tabular-nums`} {...registration} />
);

export function Disclosure({ title, children }: { title: string; children: ReactNode }) {
  return (
    <details className="rounded-lg border border-line bg-panel p-4">
      <summary className="cursor-pointer font-semibold text-accent">{title}</summary>
      <div className="mt-3">{children}</div>
    </details>
  );
}

/** The submit button of a small form, with the server's refusal (if any) or a confirmation under it. */
export function SubmitRow({ label, submitting, failure, done }: { label: string; submitting: boolean; failure: string | null; done?: string | null }) {
  return (
    <div className="md:col-span-4">
      <button type="submit" disabled={submitting} className="rounded-md bg-accent px-4 py-1.5 font-semibold text-white hover:bg-accent-strong disabled:opacity-60">
        {label}
      </button>
      {failure ? (
        <p role="alert" className="mt-2 rounded-md bg-bad-pale px-3 py-2 text-sm text-bad">
          {failure}
        </p>
      ) : null}
      {done && !failure ? (
        <p role="status" className="mt-2 rounded-md bg-accent-pale px-3 py-2 text-sm text-accent-strong">
          {done}
        </p>
      ) : null}
    </div>
  );
}
