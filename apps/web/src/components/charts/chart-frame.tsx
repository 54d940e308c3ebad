import type { ReactNode } from "react";

/** Every chart sits in a figure with a title and a plain-words caption saying what it shows. */
export function ChartFrame({ title, caption, children, actions }: { title: string; caption: ReactNode; children: ReactNode; actions?: ReactNode }) {
  return (
    <figure className="flex min-w-0 flex-col rounded-lg border border-line bg-panel p-4">
      <div className="mb-2 flex flex-wrap items-start justify-between gap-2">
        <h3 className="font-semibold">{title}</h3>
        {actions}
      </div>
      <div className="h-64 w-full">{children}</div>
      <figcaption className="mt-3 text-sm text-ink-soft">{caption}</figcaption>
    </figure>
  );
}

/** Shared chart colours (from the theme): measured data in teal, fitted models in warm brown. */
export const CHART_COLOURS = {
  data: "#1f6f78",
  dataPale: "#9fcfd0",
  model: "#8a4b00",
  grid: "#d9dcd8",
  ink: "#1c2733",
  inkSoft: "#4a5868",
} as const;

export const AXIS_TICK = { fill: CHART_COLOURS.inkSoft, fontSize: 12 } as const;
export const AXIS_LABEL_STYLE = { fill: CHART_COLOURS.ink, fontSize: 12 } as const;
