import type { ReactNode } from "react";

/** Standard page frame: a heading, an optional one-line purpose, and the content. */
export function Page({ title, intro, actions, children }: { title: string; intro?: ReactNode; actions?: ReactNode; children: ReactNode }) {
  return (
    <div className="mx-auto w-full max-w-7xl px-4 py-6 sm:px-6">
      <div className="mb-5 flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold tracking-tight">{title}</h1>
          {intro ? <p className="mt-1 max-w-3xl text-ink-soft">{intro}</p> : null}
        </div>
        {actions}
      </div>
      {children}
    </div>
  );
}

/** A friendly box for empty, error and notice states: what happened and what to do next. */
export function Notice({ tone = "info", title, children }: { tone?: "info" | "warn" | "bad"; title: string; children?: ReactNode }) {
  const tones = {
    info: "border-line bg-panel",
    warn: "border-warn/40 bg-warn-pale",
    bad: "border-bad/40 bg-bad-pale",
  } as const;
  return (
    <div role={tone === "bad" ? "alert" : "status"} className={`rounded-lg border p-4 ${tones[tone]}`}>
      <p className="font-semibold">{title}</p>
      {children ? <div className="mt-1 text-ink-soft">{children}</div> : null}
    </div>
  );
}

/** What went wrong with the last action, in words, announced at once; nothing when there is no problem. */
export function Problem({ text, className = "" }: { text: string | null | undefined; className?: string }) {
  return text ? (
    <p role="alert" className={`rounded-md bg-bad-pale px-3 py-2 text-sm text-bad ${className}`.trim()}>
      {text}
    </p>
  ) : null;
}
