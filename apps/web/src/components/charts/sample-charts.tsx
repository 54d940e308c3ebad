import { useMemo, useState } from "react";
import { Brush, CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis, ZAxis } from "recharts";
import { formatArcsec } from "../../lib/format";
import { AXIS_LABEL_STYLE, AXIS_TICK, CHART_COLOURS, CHART_MARGIN as margin, ChartFrame, seeingYAxis } from "./chart-frame";

export interface TimedSeeing {
  timeMs: number;
  seeingArcsec: number;
}

export interface AxisSeeing {
  seeingLongArcsec: number;
  seeingTransArcsec: number;
}

const clock = (timeMs: number) => new Date(timeMs).toISOString().slice(11, 16);

/** About this many time labels under the night chart, whatever part of the night is shown. */
const NIGHT_TIME_LABELS = 5;

/** Seeing through one night, with a range slider under the chart to zoom into part of it. */
export function NightSeriesChart({ night, samples, picker, loading = false }: { night: string; samples: TimedSeeing[]; picker: React.ReactNode; loading?: boolean }) {
  const sorted = useMemo(() => [...samples].sort((a, b) => a.timeMs - b.timeMs), [samples]);
  // How many samples the slider leaves in view. The time labels are every n-th of them: left to itself the chart
  // would measure each of the night's several hundred labels to choose those that fit, the largest single cost of
  // drawing the site page.
  const [shownCount, setShownCount] = useState<number | null>(null);
  const labelEvery = Math.max(1, Math.ceil((shownCount ?? sorted.length) / NIGHT_TIME_LABELS));
  return (
    <ChartFrame
      title={`Seeing through the night of ${night}`}
      actions={picker}
      caption="Every accepted sample of the chosen night, in time order (UTC). Drag the ends of the slider under the chart (or Tab to one and use the arrow keys) to zoom into part of the night; short spikes are often passing cloud or a gust, a slow rise a changing ground layer."
    >
      {loading ? (
        <p role="status" className="flex h-full items-center justify-center text-ink-soft">
          Loading the samples of this night…
        </p>
      ) : sorted.length === 0 ? (
        <p className="flex h-full items-center justify-center text-ink-soft">No accepted samples in this night with the current filters.</p>
      ) : (
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={sorted} margin={{ ...margin, bottom: 8 }}>
            <CartesianGrid stroke={CHART_COLOURS.grid} />
            <XAxis dataKey="timeMs" type="category" tick={AXIS_TICK} tickFormatter={clock} interval={labelEvery - 1} height={44} label={{ value: "Time (UTC)", position: "insideBottom", offset: 6, style: AXIS_LABEL_STYLE }} />
            <YAxis {...seeingYAxis("Seeing (arcsec)")} />
            <Tooltip
              formatter={(value) => [typeof value === "number" ? formatArcsec(value) : String(value), "Seeing"]}
              labelFormatter={(value) => (typeof value === "number" ? `${clock(value)} UTC` : String(value))}
            />
            <Line dataKey="seeingArcsec" stroke={CHART_COLOURS.data} dot={false} strokeWidth={1.5} isAnimationActive={false} />
            <Brush
              dataKey="timeMs"
              height={22}
              travellerWidth={10}
              stroke={CHART_COLOURS.data}
              tickFormatter={clock}
              ariaLabel="Start or end of the part of the night shown"
              onChange={(range) => setShownCount(range.endIndex - range.startIndex + 1)}
            />
          </LineChart>
        </ResponsiveContainer>
      )}
    </ChartFrame>
  );
}

/**
 * A sample of the cloud as a plain circle: a thousand of recharts' own symbols (a path computed for each) made this
 * the slowest chart of the site page to draw.
 */
const dot = (props: { cx?: number; cy?: number }) => <circle cx={props.cx} cy={props.cy} r={1.8} fill={CHART_COLOURS.data} fillOpacity={0.45} />;

/**
 * Longitudinal against transverse seeing. A healthy monitor puts the cloud on the diagonal (the atmosphere has no
 * preferred direction); a cloud tilted away from it points to wind shake, defocus or a wrong pixel scale on one axis.
 */
export function LongTransScatter({ samples, shownCount, totalCount, ratio }: { samples: AxisSeeing[]; shownCount: number; totalCount: number; ratio: number | null }) {
  const maxArcsec = samples.reduce((max, sample) => Math.max(max, sample.seeingLongArcsec, sample.seeingTransArcsec), 0.5);
  const limit = Math.ceil(maxArcsec * 5) / 5;
  return (
    <ChartFrame
      title="Longitudinal against transverse seeing"
      caption={
        <>
          A health check of the monitor: each dot is one sample, estimated along the line joining the two subapertures
          (longitudinal) and across it (transverse). They should scatter around the dashed diagonal; a cloud tilted away
          from it means one axis is disturbed (wind shake, defocus, pixel scale).{" "}
          {ratio !== null ? `Median ratio long/trans: ${ratio.toFixed(2)}. ` : ""}
          {shownCount < totalCount ? `${shownCount.toLocaleString("en-GB")} of ${totalCount.toLocaleString("en-GB")} samples shown, evenly spread in time.` : ""}
        </>
      }
    >
      {samples.length === 0 ? (
        <p className="flex h-full items-center justify-center text-center text-ink-soft">No per-axis values: the logs of this selection give seeing or r0 directly, not the two image-motion variances.</p>
      ) : (
        <ResponsiveContainer width="100%" height="100%">
          <ScatterChart margin={margin}>
            <CartesianGrid stroke={CHART_COLOURS.grid} />
            <XAxis
              dataKey="seeingTransArcsec"
              type="number"
              domain={[0, limit]}
              tick={AXIS_TICK}
              tickFormatter={(value: number) => value.toFixed(1)}
              label={{ value: "Transverse seeing (arcsec)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }}
            />
            <YAxis
              dataKey="seeingLongArcsec"
              type="number"
              domain={[0, limit]}
              tick={AXIS_TICK}
              width={56}
              tickFormatter={(value: number) => value.toFixed(1)}
              label={{ value: "Longitudinal (arcsec)", angle: -90, position: "insideLeft", offset: 4, dy: 60, style: AXIS_LABEL_STYLE }}
            />
            <ZAxis range={[10, 10]} />
            <ReferenceLine segment={[{ x: 0, y: 0 }, { x: limit, y: limit }]} stroke={CHART_COLOURS.model} strokeDasharray="6 4" strokeWidth={1.5} />
            <Tooltip formatter={(value) => (typeof value === "number" ? formatArcsec(value) : String(value))} />
            <Scatter data={samples} fill={CHART_COLOURS.data} fillOpacity={0.45} isAnimationActive={false} shape={dot} />
          </ScatterChart>
        </ResponsiveContainer>
      )}
    </ChartFrame>
  );
}
