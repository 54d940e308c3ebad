import type { ComparisonResponse, ComparisonRow } from "@calmcrest/contracts";
import { formatArcsec, formatNumber, formatPercent } from "../../lib/format";
import { SeriesLegend } from "../compare/series-style";
import { OnDemandMonthlyMediansChart, OnDemandOverlaidCdfChart } from "../on-demand";

// The frozen comparison of a report version: one table row per site (or campaign), the paired verdicts in words,
// and the Compare page's two overlaid charts (same line styles as there), all drawn from the stored numbers only
// (never recomputed). The table is this module's own: fewer columns than the Compare page's, so it fits an A4 page.

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
      <dt className="text-ink-soft">Monitors</dt>
      <dd>
        <ul>
          {comparison.rows.flatMap((row) =>
            row.campaigns.map((campaign) => (
              <li key={`${row.key}-${campaign.id}`}>
                {row.site.name} — {campaign.name}: subapertures {formatNumber(campaign.apertureMm)} mm, baseline {formatNumber(campaign.baselineMm)} mm, {formatNumber(campaign.wavelengthNm)} nm
                {campaign.pixelScaleArcsec === null ? "" : `, ${formatNumber(campaign.pixelScaleArcsec, 2)}″/pixel`}
                {campaign.exposureMs === null ? "" : `, exposure ${formatNumber(campaign.exposureMs, 1)} ms`}, {campaign.heightAboveGroundM === null ? "height not given" : `${formatNumber(campaign.heightAboveGroundM, 1)} m above ground`},{" "}
                {campaign.responseName}; {campaign.uploads.length} upload{campaign.uploads.length === 1 ? "" : "s"}
                {campaign.exclusions.length > 0 ? `, ${campaign.exclusions.length} excluded window${campaign.exclusions.length === 1 ? "" : "s"}` : ""}
              </li>
            )),
          )}
        </ul>
      </dd>
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
      <div className="report-charts space-y-3">
        <SeriesLegend rows={comparison.rows} />
        <div className="grid gap-4 lg:grid-cols-2">
          <OnDemandOverlaidCdfChart rows={comparison.rows} />
          <OnDemandMonthlyMediansChart rows={comparison.rows} />
        </div>
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
