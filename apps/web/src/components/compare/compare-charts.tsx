import { Bar, BarChart, CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { ComparisonPair, ComparisonRow } from "@calmcrest/contracts";
import { formatArcsec, formatPercent } from "../../lib/format";
import { AXIS_LABEL_STYLE, AXIS_TICK, CHART_COLOURS, CHART_MARGIN as margin, ChartFrame, seeingYAxis, shareYAxis, zenithSeeingXAxis } from "../charts/chart-frame";
import { MarkerShape, styleOf } from "./series-style";


/** Draws a site's marker on every tenth point only, so the dash pattern stays readable between them. */
const sparseDot =
  (index: number, every: number) =>
  (props: { cx?: number; cy?: number; index?: number }) => {
    const { cx, cy } = props;
    if (typeof cx !== "number" || typeof cy !== "number" || (props.index ?? 0) % every !== (index * 2) % every) return <g key={`${index}-${props.index ?? 0}`} />;
    return <MarkerShape key={`${index}-${props.index ?? 0}`} style={styleOf(index)} x={cx} y={cy} />;
  };

/** The cumulative distributions of every compared site, overlaid: lines told apart by dash and marker as well as colour. */
export function OverlaidCdfChart({ rows }: { rows: ComparisonRow[] }) {
  const withData = rows.map((row, index) => ({ row, index })).filter(({ row }) => row.statistics !== null);
  // The axis ends a little past the worst 90th percentile: the last percent of a distribution is a long, flat tail.
  const worstP90 = Math.max(0.5, ...withData.map(({ row }) => row.statistics?.seeing.p90 ?? 0));
  const step = worstP90 * 1.5 > 2 ? 0.5 : 0.2;
  const upperArcsec = Math.ceil((worstP90 * 1.5) / step) * step;
  const ticks = Array.from({ length: Math.round(upperArcsec / step) + 1 }, (_, index) => Number((index * step).toFixed(1)));
  return (
    <ChartFrame
      title="Share of time at or below a seeing value, site by site"
      caption={
        <>
          A curve further left is a sharper site: read across from a seeing value to how much of its observed time was at least that good. The dashed
          vertical line marks 0.8″. Each site keeps its line style in every chart (see the key above the charts).
        </>
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <LineChart margin={margin}>
          <CartesianGrid stroke={CHART_COLOURS.grid} />
          <XAxis {...zenithSeeingXAxis()} domain={[0, upperArcsec]} ticks={ticks} allowDataOverflow />
          <YAxis {...shareYAxis("At or below (%)", { width: 48, dy: 50 })} />
          <ReferenceLine x={0.8} stroke={CHART_COLOURS.inkSoft} strokeDasharray="5 4" />
          <Tooltip formatter={(value, name) => [typeof value === "number" ? formatPercent(value, 1) : String(value), name]} labelFormatter={(value) => (typeof value === "number" ? formatArcsec(value) : String(value))} />
          {withData.map(({ row, index }) => (
            <Line
              key={row.key}
              data={row.statistics?.cdf ?? []}
              dataKey="fraction"
              name={row.label}
              type="linear"
              stroke={styleOf(index).colour}
              strokeDasharray={styleOf(index).dash || undefined}
              strokeWidth={2.5}
              dot={sparseDot(index, 10)}
              activeDot={false}
              isAnimationActive={false}
            />
          ))}
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

/** Monthly medians of every compared site on one month axis (lines with markers; a gap where a site has no samples). */
export function MonthlyMediansChart({ rows }: { rows: ComparisonRow[] }) {
  const months = [...new Set(rows.flatMap((row) => row.statistics?.monthly.map((month) => month.month) ?? []))].sort();
  const data = months.map((month) => {
    const point: Record<string, string | number | null> = { month };
    rows.forEach((row) => (point[row.key] = row.statistics?.monthly.find((entry) => entry.month === month)?.median ?? null));
    return point;
  });
  return (
    <ChartFrame
      title="Median seeing month by month, site by site"
      caption={<>Each point is one site's median over the samples of one month (a night counts in the month of its evening). Months where two sites both have points are the fairest to compare.</>}
    >
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={margin}>
          <CartesianGrid stroke={CHART_COLOURS.grid} vertical={false} />
          <XAxis dataKey="month" tick={AXIS_TICK} interval="preserveStartEnd" minTickGap={12} label={{ value: "Month (UTC)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }} />
          <YAxis {...seeingYAxis("Median (arcsec)", { width: 48 })} />
          <Tooltip formatter={(value, name) => [typeof value === "number" ? formatArcsec(value) : "–", name]} />
          {rows.map((row, index) => (
            <Line
              key={row.key}
              dataKey={row.key}
              name={row.label}
              stroke={styleOf(index).colour}
              strokeDasharray={styleOf(index).dash || undefined}
              strokeWidth={2}
              dot={sparseDot(index, 1)}
              activeDot={false}
              connectNulls={false}
              isAnimationActive={false}
            />
          ))}
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

/** Histogram of one pair's night-by-night differences of nightly medians (A − B); left of zero A was sharper. */
export function DifferenceHistogram({ pair, nameA, nameB }: { pair: ComparisonPair; nameA: string; nameB: string }) {
  const bins = pair.paired?.histogram ?? [];
  const data = bins.map((bin) => ({ ...bin, centreArcsec: (bin.lowArcsec + bin.highArcsec) / 2 }));
  // Round ticks either side of zero (0.1″ apart, or 0.25″ for a wide spread), so the zero line always has a label.
  const lowArcsec = Math.min(-0.1, ...bins.map((bin) => bin.lowArcsec));
  const highArcsec = Math.max(0.1, ...bins.map((bin) => bin.highArcsec));
  const step = highArcsec - lowArcsec > 1 ? 0.25 : 0.1;
  const first = Math.floor(lowArcsec / step);
  const ticks = Array.from({ length: Math.ceil(highArcsec / step) - first + 1 }, (_, index) => Number(((first + index) * step).toFixed(2)));
  return (
    <ChartFrame
      title={`Night by night: ${nameA} − ${nameB}`}
      caption={
        <>
          Each bar counts the common nights whose nightly medians differed by that much. Bars left of the zero line are nights when {nameA} was sharper, bars right of it
          nights when {nameB} was.
        </>
      }
    >
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={margin} barCategoryGap={1}>
          <CartesianGrid stroke={CHART_COLOURS.grid} vertical={false} />
          <XAxis
            dataKey="centreArcsec"
            type="number"
            domain={[ticks[0] ?? lowArcsec, ticks[ticks.length - 1] ?? highArcsec]}
            ticks={ticks}
            tick={AXIS_TICK}
            tickFormatter={(value: number) => value.toFixed(2)}
            label={{ value: "Difference of nightly medians (arcsec)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }}
          />
          <YAxis tick={AXIS_TICK} width={40} allowDecimals={false} label={{ value: "Nights", angle: -90, position: "insideLeft", offset: 4, dy: 20, style: AXIS_LABEL_STYLE }} />
          <ReferenceLine x={0} stroke={CHART_COLOURS.ink} strokeWidth={1.5} />
          <Tooltip
            formatter={(value) => [String(value), "Nights"]}
            labelFormatter={(_, payload) => {
              const bin = payload[0]?.payload as (typeof data)[number] | undefined;
              return bin ? `${bin.lowArcsec.toFixed(2)} to ${bin.highArcsec.toFixed(2)}″` : "";
            }}
          />
          <Bar dataKey="count" fill={CHART_COLOURS.dataPale} stroke={CHART_COLOURS.data} isAnimationActive={false} />
        </BarChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}
