import { CartesianGrid, Legend, Line, LineChart, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { ComparisonResponse, ComparisonRow } from "@calmcrest/contracts";
import { formatArcsec, formatNumber, formatPercent } from "../../lib/format";
import { AXIS_LABEL_STYLE, AXIS_TICK, CHART_COLOURS, ChartFrame } from "../charts/chart-frame";

// The frozen comparison of a report version: one table row per site (or campaign), the paired verdicts in words,
// and two charts, all drawn from the stored numbers only (never recomputed).

/** Lines told apart without colour: each row gets its own dash pattern and marker as well. */
const LINE_STYLES = [
  { colour: "#1f6f78", dash: undefined, marker: "circle" },
  { colour: "#8a4b00", dash: "8 4", marker: "square" },
  { colour: "#5b3f8c", dash: "2 3", marker: "diamond" },
  { colour: "#2d6a2f", dash: "12 4 2 4", marker: "triangle" },
  { colour: "#a3262a", dash: "4 4", marker: "cross" },
  { colour: "#1c2733", dash: "1 5", marker: "star" },
] as const;
const styleOf = (index: number) => LINE_STYLES[index % LINE_STYLES.length] ?? LINE_STYLES[0];

function interval(ci: [number, number] | null | undefined): string {
  return ci ? `${ci[0].toFixed(2)}–${ci[1].toFixed(2)}″` : "none (too few nights)";
}

function unique<T>(values: T[]): T[] {
  return [...new Set(values)];
}

function monitorHeights(row: ComparisonRow): string {
  const heights = unique(row.campaigns.map((campaign) => campaign.heightAboveGroundM));
  return heights.map((height) => (height === null ? "not given" : `${formatNumber(height, 1)} m`)).join(", ");
}

export function ComparisonTable({ comparison }: { comparison: ComparisonResponse }) {
  const thresholds = Object.keys(comparison.rows.find((row) => row.statistics)?.statistics?.fractionBelow ?? {});
  return (
    <div className="comparison-table overflow-x-auto rounded-lg border border-line bg-panel">
      <table className="w-full min-w-[56rem] border-collapse text-sm">
        <caption className="px-3 py-2 text-left text-ink-soft">
          Seeing at zenith and 500 nm for each {comparison.kind === "sites" ? "site" : "campaign"}, as frozen in this version. Intervals are 95 % whole-night
          bootstrap intervals.
        </caption>
        <thead>
          <tr className="border-y border-line bg-paper text-left">
            <th scope="col" className="px-3 py-2">{comparison.kind === "sites" ? "Site" : "Campaign"}</th>
            <th scope="col" className="num px-3 py-2">Samples</th>
            <th scope="col" className="num px-3 py-2">Nights</th>
            <th scope="col" className="num px-3 py-2">Median (″)</th>
            <th scope="col" className="px-3 py-2">95 % interval</th>
            <th scope="col" className="num px-3 py-2">p10 / p25 / p75 / p90 (″)</th>
            <th scope="col" className="num px-3 py-2">Median r0 (cm)</th>
            {thresholds.map((threshold) => (
              <th key={threshold} scope="col" className="num px-3 py-2">
                Time below {threshold}″
              </th>
            ))}
            <th scope="col" className="num px-3 py-2">Season-balanced median (″)</th>
            <th scope="col" className="px-3 py-2">Monitor height, response set</th>
          </tr>
        </thead>
        <tbody>
          {comparison.rows.map((row) => {
            const stats = row.statistics;
            return (
              <tr key={row.key} className="border-b border-line align-top">
                <th scope="row" className="px-3 py-2 text-left font-semibold">{row.label}</th>
                <td className="num px-3 py-2">{formatNumber(stats?.samples)}</td>
                <td className="num px-3 py-2">{formatNumber(stats?.nights)}</td>
                <td className="num px-3 py-2 font-semibold">{formatArcsec(stats?.seeing.median)}</td>
                <td className="px-3 py-2">{stats ? interval(stats.seeing.medianCi95) : "–"}</td>
                <td className="num px-3 py-2 whitespace-nowrap">
                  {stats ? [stats.seeing.p10, stats.seeing.p25, stats.seeing.p75, stats.seeing.p90].map((value) => value.toFixed(2)).join(" / ") : "–"}
                </td>
                <td className="num px-3 py-2">{formatNumber(stats?.r0.median, 1)}</td>
                {thresholds.map((threshold) => (
                  <td key={threshold} className="num px-3 py-2">
                    {formatPercent(stats?.fractionBelow[threshold])}
                  </td>
                ))}
                <td className="num px-3 py-2">{formatArcsec(stats?.seasonBalanced.medianArcsec)}</td>
                <td className="min-w-[11rem] px-3 py-2">
                  {monitorHeights(row)}; {unique(row.campaigns.map((campaign) => campaign.responseName.replace(/\s*\(.*\)$/, ""))).join("; ")}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

function CumulativeOverlay({ comparison }: { comparison: ComparisonResponse }) {
  const series = comparison.rows.filter((row) => row.statistics);
  return (
    <ChartFrame
      title="Share of time at or below a seeing value"
      caption="One line per row (each with its own dash pattern and marker): read across from a seeing value to the share of the observed time that was at least that good. A line further left is the sharper site."
    >
      <ResponsiveContainer width="100%" height="100%">
        <LineChart margin={{ top: 8, right: 16, bottom: 28, left: 8 }}>
          <CartesianGrid stroke={CHART_COLOURS.grid} />
          <XAxis
            type="number"
            dataKey="seeingArcsec"
            domain={[0, "auto"]}
            tick={AXIS_TICK}
            tickFormatter={(value: number) => value.toFixed(1)}
            label={{ value: "Seeing at zenith, 500 nm (arcsec)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }}
            allowDuplicatedCategory={false}
          />
          <YAxis type="number" domain={[0, 1]} tick={AXIS_TICK} width={48} tickFormatter={(value: number) => `${Math.round(value * 100)} %`} />
          <Tooltip formatter={(value) => (typeof value === "number" ? `${(value * 100).toFixed(0)} %` : String(value))} labelFormatter={(label) => `${Number(label).toFixed(2)}″`} />
          <Legend verticalAlign="top" height={28} />
          {series.map((row, index) => {
            const style = styleOf(index);
            return (
              <Line
                key={row.key}
                data={row.statistics?.cdf ?? []}
                dataKey="fraction"
                name={row.label}
                type="monotone"
                stroke={style.colour}
                strokeDasharray={style.dash}
                strokeWidth={2}
                dot={false}
                legendType={style.marker}
                isAnimationActive={false}
              />
            );
          })}
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

function MonthlyOverlay({ comparison }: { comparison: ComparisonResponse }) {
  const months = unique(comparison.rows.flatMap((row) => row.statistics?.monthly.map((month) => month.month) ?? [])).sort();
  const data = months.map((month) => {
    const point: Record<string, number | string | null> = { month };
    for (const row of comparison.rows) point[row.key] = row.statistics?.monthly.find((entry) => entry.month === month)?.median ?? null;
    return point;
  });
  return (
    <ChartFrame
      title="Median seeing by month"
      caption="Monthly median seeing of each row (markers and dash patterns tell them apart). A gap means no sample that month; months observed at only one site are not a like-for-like comparison."
    >
      <ResponsiveContainer width="100%" height="100%">
        <LineChart data={data} margin={{ top: 8, right: 16, bottom: 28, left: 8 }}>
          <CartesianGrid stroke={CHART_COLOURS.grid} />
          <XAxis dataKey="month" tick={AXIS_TICK} interval="preserveStartEnd" minTickGap={12} label={{ value: "Month (night date)", position: "insideBottom", offset: -16, style: AXIS_LABEL_STYLE }} />
          <YAxis tick={AXIS_TICK} width={48} domain={["auto", "auto"]} tickFormatter={(value: number) => `${value.toFixed(2)}″`} />
          <Tooltip formatter={(value) => (typeof value === "number" ? `${value.toFixed(2)}″` : "no data")} />
          <Legend verticalAlign="top" height={28} />
          {comparison.rows.map((row, index) => {
            const style = styleOf(index);
            return (
              <Line
                key={row.key}
                dataKey={row.key}
                name={row.label}
                stroke={style.colour}
                strokeDasharray={style.dash}
                strokeWidth={2}
                connectNulls={false}
                dot={{ r: 3 }}
                legendType={style.marker}
                isAnimationActive={false}
              />
            );
          })}
        </LineChart>
      </ResponsiveContainer>
    </ChartFrame>
  );
}

/** How the frozen numbers were made: window, filters, coefficient sets, telescope, warnings, pairs. */
function Settings({ comparison }: { comparison: ComparisonResponse }) {
  const window = comparison.window.from || comparison.window.to ? `${comparison.window.from ?? "first sample"} to ${comparison.window.to ?? "last sample"}` : "every stored night";
  const filters = comparison.filters;
  return (
    <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
      <dt className="text-ink-soft">Window</dt>
      <dd>{window}</dd>
      <dt className="text-ink-soft">Filters</dt>
      <dd>
        zenith angle up to {filters.maxZenithDeg}°, sun below {filters.sunMaxDeg}°{filters.minFlux === null ? "" : `, flux at least ${filters.minFlux}`}
        {filters.standard ? " (the standard filters)" : ""}
      </dd>
      <dt className="text-ink-soft">Response coefficients</dt>
      <dd>{comparison.coefficientSets.join("; ") || "–"}</dd>
      <dt className="text-ink-soft">Planned telescope</dt>
      <dd>{comparison.telescope.method}</dd>
      <dt className="text-ink-soft">Pairing</dt>
      <dd>{comparison.pairing.matching === "bins" ? `only the ${comparison.pairing.binMinutes}-minute bins both monitors ran` : "nights both monitors ran"}</dd>
    </dl>
  );
}

export function ComparisonView({ comparison }: { comparison: ComparisonResponse }) {
  const labelOf = (key: string) => comparison.rows.find((row) => row.key === key)?.label ?? key;
  const warnings = [...comparison.warnings, ...comparison.rows.flatMap((row) => row.warnings.map((warning) => ({ ...warning, message: `${row.label}: ${warning.message}` })))];
  return (
    <div className="space-y-4">
      <ComparisonTable comparison={comparison} />
      {comparison.pairs.length > 0 ? (
        <div className="rounded-lg border border-line bg-panel p-4">
          <h3 className="font-semibold">Night by night</h3>
          <ul className="mt-2 space-y-1 text-sm">
            {comparison.pairs.map((pair) => (
              <li key={`${pair.aKey}|${pair.bKey}`}>
                <span className="font-semibold">
                  {labelOf(pair.aKey)} and {labelOf(pair.bKey)}:
                </span>{" "}
                {pair.paired?.sentence ?? "No paired figures."}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      <div className="report-charts grid gap-4 lg:grid-cols-2">
        <CumulativeOverlay comparison={comparison} />
        <MonthlyOverlay comparison={comparison} />
      </div>
      <div className="rounded-lg border border-line bg-panel p-4">
        <h3 className="font-semibold">How these numbers were made</h3>
        <div className="mt-2">
          <Settings comparison={comparison} />
        </div>
        {warnings.length > 0 ? (
          <ul className="mt-3 list-disc space-y-1 pl-5 text-sm text-warn">
            {warnings.map((warning, index) => (
              <li key={`${warning.code}-${index}`}>{warning.message}</li>
            ))}
          </ul>
        ) : null}
      </div>
    </div>
  );
}
