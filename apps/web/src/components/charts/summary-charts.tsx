import {
  Bar,
  BarChart,
  CartesianGrid,
  ComposedChart,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
  type BarShapeProps,
} from "recharts";
import type { SeeingStatistics } from "@calmcrest/contracts";
import { formatArcsec, formatNumber, formatPercent } from "../../lib/format";
import { AXIS_LABEL_STYLE, AXIS_TICK, CHART_COLOURS, CHART_MARGIN as margin, ChartFrame, seeingYAxis, shareYAxis, zenithSeeingXAxis } from "./chart-frame";
import { boxGeometry, type BoxQuantiles } from "./box-geometry";


/** Histogram of seeing on log-spaced bins, with the fitted log-normal density drawn over it. */
export function SeeingHistogram({ summary }: { summary: SeeingStatistics }) {
  const data = summary.histogram.map((bin) => ({
    label: `${bin.lowArcsec.toFixed(2)}–${bin.highArcsec.toFixed(2)}`,
    centreArcsec: Math.sqrt(bin.lowArcsec * bin.highArcsec),
    density: bin.density,
    lognormalDensity: bin.lognormalDensity,
    count: bin.count,
  }));
  return (
    <ChartFrame
      title="How often each seeing value occurs"
      caption={
        <>
          Bars: share of samples per seeing bin (bins widen with seeing, so the axis is logarithmic). Line: the log-normal
          distribution fitted to the same samples, median {formatArcsec(summary.lognormal.median)}; the largest gap between
          the two cumulative curves (Kolmogorov–Smirnov distance) is {summary.lognormal.ks.toFixed(3)}.
        </>
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={data} margin={margin} barCategoryGap={1}>
          <CartesianGrid stroke={CHART_COLOURS.grid} vertical={false} />
          <XAxis
            dataKey="centreArcsec"
            tick={AXIS_TICK}
            tickFormatter={(value: number) => value.toFixed(2)}
            interval="preserveStartEnd"
            minTickGap={18}
            label={{ value: "Seeing at zenith, 500 nm (arcsec, log scale)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }}
          />
          <YAxis tick={AXIS_TICK} width={56} label={{ value: "Density (per arcsec)", angle: -90, position: "insideLeft", offset: 4, dy: 60, style: AXIS_LABEL_STYLE }} />
          <Tooltip
            formatter={(value, name) => [typeof value === "number" ? value.toFixed(3) : String(value), name === "density" ? "Measured density" : "Log-normal fit"]}
            labelFormatter={(_, payload) => {
              const row = payload[0]?.payload as (typeof data)[number] | undefined;
              return row ? `${row.label}″ · ${formatNumber(row.count)} samples` : "";
            }}
          />
          <Bar dataKey="density" fill={CHART_COLOURS.dataPale} stroke={CHART_COLOURS.data} isAnimationActive={false} />
          <Line dataKey="lognormalDensity" type="monotone" stroke={CHART_COLOURS.model} strokeWidth={2.5} dot={false} isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

/** The cumulative distribution: the fraction of samples at or below each seeing value. */
export function CumulativeChart({ summary }: { summary: SeeingStatistics }) {
  const fractionAt08 = summary.fractionBelow["0.8"];
  return (
    <ChartFrame
      title="Share of time at or below a seeing value"
      caption={
        <>
          Read across from a seeing value to see how much of the observed time was at least that good. Half the samples lie
          at or below the median ({formatArcsec(summary.seeing.median)}); {formatPercent(fractionAt08)} lie below 0.8″ (dashed line).
        </>
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={summary.cdf} margin={margin}>
          <CartesianGrid stroke={CHART_COLOURS.grid} />
          <XAxis {...zenithSeeingXAxis()} domain={["dataMin", "dataMax"]} />
          <YAxis {...shareYAxis("Samples at or below (%)")} />
          <ReferenceLine x={0.8} stroke={CHART_COLOURS.inkSoft} strokeDasharray="5 4" />
          <Tooltip
            formatter={(value) => [typeof value === "number" ? formatPercent(value, 1) : String(value), "At or below"]}
            labelFormatter={(value) => (typeof value === "number" ? formatArcsec(value) : String(value))}
          />
          <Line dataKey="fraction" type="stepAfter" stroke={CHART_COLOURS.data} strokeWidth={2.5} dot={false} isAnimationActive={false} />
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

type MonthRow = SeeingStatistics["monthly"][number] & { range: [number, number] };

function BoxShape(props: BarShapeProps) {
  const row = props.payload as MonthRow | undefined;
  const { x, y, width, height } = props;
  if (!row || typeof x !== "number" || typeof y !== "number" || typeof width !== "number" || typeof height !== "number") return null;
  const quantiles: BoxQuantiles = row;
  const rows = boxGeometry(y, height, quantiles);
  const centre = x + width / 2;
  const boxWidth = Math.max(6, Math.min(28, width * 0.6));
  return (
    <g>
      <line x1={centre} x2={centre} y1={rows.whiskerTop} y2={rows.whiskerBottom} stroke={CHART_COLOURS.ink} strokeWidth={1.5} />
      <line x1={centre - boxWidth / 4} x2={centre + boxWidth / 4} y1={rows.whiskerTop} y2={rows.whiskerTop} stroke={CHART_COLOURS.ink} strokeWidth={1.5} />
      <line x1={centre - boxWidth / 4} x2={centre + boxWidth / 4} y1={rows.whiskerBottom} y2={rows.whiskerBottom} stroke={CHART_COLOURS.ink} strokeWidth={1.5} />
      <rect x={centre - boxWidth / 2} y={rows.boxTop} width={boxWidth} height={Math.max(1, rows.boxBottom - rows.boxTop)} fill={CHART_COLOURS.dataPale} stroke={CHART_COLOURS.data} strokeWidth={1.5} />
      <line x1={centre - boxWidth / 2} x2={centre + boxWidth / 2} y1={rows.median} y2={rows.median} stroke={CHART_COLOURS.ink} strokeWidth={2.5} />
    </g>
  );
}

/** Monthly box plots: whiskers p10–p90, box p25–p75, bar at the median. */
export function MonthlyBoxChart({ summary }: { summary: SeeingStatistics }) {
  const data: MonthRow[] = summary.monthly.map((month) => ({ ...month, range: [month.p10, month.p90] }));
  const best = [...summary.monthly].sort((a, b) => a.median - b.median)[0];
  return (
    <ChartFrame
      title="Seeing month by month"
      caption={
        <>
          For each month: the box holds the middle half of the samples (25th to 75th percentile), the thick line is the median,
          the whiskers reach the 10th and 90th percentiles. A night counts in the month of the evening it begins. {best ? `The best median month is ${best.month} (${formatArcsec(best.median)}).` : ""}
        </>
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={margin}>
          <CartesianGrid stroke={CHART_COLOURS.grid} vertical={false} />
          <XAxis dataKey="month" tick={AXIS_TICK} label={{ value: "Month (UTC)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }} />
          <YAxis {...seeingYAxis("Seeing (arcsec)")} />
          <Tooltip
            cursor={{ fill: "#dcefee" }}
            content={({ active, payload }) => {
              const row = payload?.[0]?.payload as MonthRow | undefined;
              if (!active || !row) return null;
              return (
                <div className="rounded border border-line bg-panel p-2 text-sm shadow">
                  <p className="font-semibold">{row.month}</p>
                  <p className="num">90th pct. {formatArcsec(row.p90)}</p>
                  <p className="num">75th pct. {formatArcsec(row.p75)}</p>
                  <p className="num font-semibold">median {formatArcsec(row.median)}</p>
                  <p className="num">25th pct. {formatArcsec(row.p25)}</p>
                  <p className="num">10th pct. {formatArcsec(row.p10)}</p>
                  <p className="num text-ink-soft">{formatNumber(row.samples)} samples</p>
                </div>
              );
            }}
          />
          <Bar dataKey="range" shape={BoxShape} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

/** Hours ordered from noon to noon, so one night reads left to right without a break at midnight. */
export const noonToNoon = (hour: number) => (hour + 12) % 24;

/** Median seeing for each hour of the night (local solar time at the site). */
export function HourlyChart({ summary }: { summary: SeeingStatistics }) {
  const data = [...summary.hourly].sort((a, b) => noonToNoon(a.hour) - noonToNoon(b.hour)).map((hour) => ({ ...hour, label: `${String(hour.hour).padStart(2, "0")}h` }));
  return (
    <ChartFrame
      title="Median seeing by hour of night"
      caption="Each bar is the median of all samples taken in that hour, across all nights; hours are local solar time at the site, ordered from evening to morning. A rise near dusk or dawn often points to ground-layer turbulence."
    >
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={margin}>
          <CartesianGrid stroke={CHART_COLOURS.grid} vertical={false} />
          <XAxis dataKey="label" tick={AXIS_TICK} label={{ value: "Hour (local solar time)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }} />
          <YAxis {...seeingYAxis("Median seeing (arcsec)", { dy: 70 })} />
          <Tooltip
            formatter={(value) => [typeof value === "number" ? formatArcsec(value) : String(value), "Median"]}
            labelFormatter={(label, payload) => {
              const row = payload[0]?.payload as (typeof data)[number] | undefined;
              return row ? `${String(label)} · ${formatNumber(row.samples)} samples` : String(label);
            }}
          />
          <Bar dataKey="median" fill={CHART_COLOURS.data} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
