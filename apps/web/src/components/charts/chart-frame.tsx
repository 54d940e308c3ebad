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

/** The margin every chart draws inside (room under the x axis for its label). */
export const CHART_MARGIN = { top: 8, right: 16, bottom: 28, left: 8 } as const;

const oneDecimal = (value: number) => value.toFixed(1);

/** A y axis of seeing in arcsec from zero, named by `label` (`dy` centres the turned label along the axis). */
export function seeingYAxis(label: string, options: { width?: number; dy?: number } = {}) {
  return {
    tick: AXIS_TICK,
    width: options.width ?? 56,
    domain: [0, "auto"],
    tickFormatter: oneDecimal,
    label: { value: label, angle: -90, position: "insideLeft", offset: 4, dy: options.dy ?? 50, style: AXIS_LABEL_STYLE },
  } as const;
}

/** A y axis of a share from 0 to 1 shown in per cent, for cumulative distributions. */
export function shareYAxis(label: string, options: { width?: number; dy?: number } = {}) {
  return {
    domain: [0, 1],
    tick: AXIS_TICK,
    width: options.width ?? 56,
    tickFormatter: (value: number) => `${Math.round(value * 100)}`,
    label: { value: label, angle: -90, position: "insideLeft", offset: 4, dy: options.dy ?? 70, style: AXIS_LABEL_STYLE },
  } as const;
}

/** The x axis of seeing at zenith and 500 nm of a cumulative distribution (the points' `seeingArcsec`). */
export function zenithSeeingXAxis(label = "Seeing at zenith, 500 nm (arcsec)") {
  return {
    dataKey: "seeingArcsec",
    type: "number",
    tick: AXIS_TICK,
    tickFormatter: oneDecimal,
    label: { value: label, position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE },
  } as const;
}
