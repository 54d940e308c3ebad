import type { ReactNode } from "react";
import type { ComparisonResponse, ComparisonRow } from "@calmcrest/contracts";
import { formatArcsec, formatNumber, formatPercent } from "../../lib/format";
import { LegendSwatch, styleOf } from "./series-style";

type Better = "lower" | "higher";

interface Column {
  id: string;
  header: string;
  unit?: string;
  /** The value compared across rows (null: none); "better" says which end wins; absent: no best marked. */
  value: (row: ComparisonRow) => number | null;
  better?: Better;
  cell: (row: ComparisonRow) => ReactNode;
  /** Plain words for the best-value note ("lowest median"). */
  bestWords?: string;
}

const THRESHOLDS = ["0.6", "0.8", "1.0"] as const;

function interval(values: [number, number] | null | undefined, format: (value: number) => string): ReactNode {
  return values ? (
    <span className="block text-xs text-ink-soft">
      95 % {format(values[0])}–{format(values[1])}
    </span>
  ) : null;
}

const heights = (row: ComparisonRow) => [...new Set(row.campaigns.map((campaign) => (campaign.heightAboveGroundM === null ? "not recorded" : `${formatNumber(campaign.heightAboveGroundM, 1)} m`)))].join(", ");
const responseSets = (row: ComparisonRow) => [...new Set(row.campaigns.map((campaign) => campaign.responseName.replace(/ \(.*\)$/, "")))].join(", ");

function columns(comparison: ComparisonResponse): Column[] {
  const stats = (row: ComparisonRow) => row.statistics;
  return [
    { id: "samples", header: "Samples", value: (row) => stats(row)?.samples ?? null, better: "higher", bestWords: "most samples", cell: (row) => formatNumber(stats(row)?.samples ?? 0) },
    { id: "nights", header: "Nights", value: (row) => stats(row)?.nights ?? null, better: "higher", bestWords: "most nights", cell: (row) => formatNumber(stats(row)?.nights ?? 0) },
    {
      id: "median",
      header: "Median seeing",
      unit: "″",
      value: (row) => stats(row)?.seeing.median ?? null,
      better: "lower",
      bestWords: "lowest median seeing",
      cell: (row) => (
        <>
          {formatArcsec(stats(row)?.seeing.median)}
          {stats(row)?.seeing.medianCi95 ? interval(stats(row)?.seeing.medianCi95, (value) => value.toFixed(2)) : <span className="block text-xs text-ink-soft">{stats(row)?.interval.status === "too_few_nights" ? "too few nights for an interval" : ""}</span>}
        </>
      ),
    },
    {
      id: "balanced",
      header: "Season-balanced median",
      unit: "″",
      value: (row) => stats(row)?.seasonBalanced.medianArcsec ?? null,
      better: "lower",
      bestWords: "lowest season-balanced median",
      cell: (row) => {
        const missing = stats(row)?.seasonBalanced.monthsMissing ?? [];
        return (
          <>
            {formatArcsec(stats(row)?.seasonBalanced.medianArcsec)}
            <span className="block max-w-[11rem] whitespace-normal text-xs text-ink-soft">{missing.length === 0 ? "every month covered" : missing.length === 12 ? "" : `missing ${missing.join(", ")}`}</span>
          </>
        );
      },
    },
    ...(["p10", "p25", "p75", "p90"] as const).map(
      (key): Column => ({ id: key, header: key, unit: "″", value: (row) => stats(row)?.seeing[key] ?? null, better: "lower", bestWords: `lowest ${key}`, cell: (row) => formatArcsec(stats(row)?.seeing[key]) }),
    ),
    { id: "r0", header: "Median r0", unit: "cm", value: (row) => stats(row)?.r0.median ?? null, better: "higher", bestWords: "largest median r0", cell: (row) => formatNumber(stats(row)?.r0.median, 1) },
    ...THRESHOLDS.map(
      (threshold): Column => ({
        id: `below-${threshold}`,
        header: `Time below ${threshold}″`,
        unit: "%",
        value: (row) => stats(row)?.fractionBelow[threshold] ?? null,
        better: "higher",
        bestWords: `most time below ${threshold}″`,
        cell: (row) => (
          <>
            {formatPercent(stats(row)?.fractionBelow[threshold])}
            {interval(stats(row)?.fractionBelowCi95[threshold], (value) => `${Math.round(value * 100)}`)}
          </>
        ),
      }),
    ),
    {
      id: "lognormal",
      header: "Log-normal μ, σ",
      value: () => null,
      cell: (row) => (stats(row) ? `${formatNumber(stats(row)?.lognormal.mu, 3)}, ${formatNumber(stats(row)?.lognormal.sigma, 3)}` : "–"),
    },
    { id: "ks", header: "KS distance", value: (row) => stats(row)?.lognormal.ks ?? null, better: "lower", bestWords: "closest log-normal fit", cell: (row) => formatNumber(stats(row)?.lognormal.ks, 3) },
    {
      id: "fwhm",
      header: `Predicted FWHM at ${formatNumber(comparison.telescope.bandNm)} nm`,
      unit: "″",
      value: (row) => stats(row)?.telescope.median ?? null,
      better: "lower",
      bestWords: "smallest predicted image",
      cell: (row) => (
        <>
          {formatArcsec(stats(row)?.telescope.median)}
          {stats(row) ? (
            <span className="block text-xs text-ink-soft">
              quartiles {formatNumber(stats(row)?.telescope.p25, 2)}–{formatNumber(stats(row)?.telescope.p75, 2)}
            </span>
          ) : null}
        </>
      ),
    },
    { id: "height", header: "Monitor height", value: () => null, cell: heights },
    { id: "response", header: "Response set", value: () => null, cell: responseSets },
  ];
}

/** Index of the best row for a column (null when there is no best or a tie for it). */
function bestRowIndex(rows: ComparisonRow[], column: Column): number | null {
  if (!column.better) return null;
  let best: number | null = null;
  let bestValue = 0;
  let tied = false;
  rows.forEach((row, index) => {
    const value = column.value(row);
    if (value === null || !Number.isFinite(value)) return;
    const wins = best === null || (column.better === "lower" ? value < bestValue : value > bestValue);
    if (wins) {
      best = index;
      bestValue = value;
      tied = false;
    } else if (value === bestValue) tied = true;
  });
  return tied || rows.filter((row) => column.value(row) !== null).length < 2 ? null : best;
}

/**
 * The comparison table: a row per site with a warnings row under it. It scrolls sideways inside its own box (never
 * the page), the site column stays in view, and the best value of each column is marked by a star and bold text,
 * not by colour.
 */
export function ComparisonTable({ comparison }: { comparison: ComparisonResponse }) {
  const cols = columns(comparison);
  const best = new Map(cols.map((column) => [column.id, bestRowIndex(comparison.rows, column)]));
  return (
    <div className="rounded-lg border border-line bg-panel">
      <p className="px-3 pt-3 text-sm text-ink-soft">
        Seeing at zenith and 500 nm, one row per {comparison.kind === "sites" ? "site" : "campaign"}. <span aria-hidden="true">★</span> and bold mark the best value in a column (lowest seeing, largest r0, most time below a threshold, most data). The table scrolls sideways.
      </p>
      <div className="relative overflow-x-auto" tabIndex={0} role="region" aria-label="Comparison table (scrolls sideways)">
        <table className="min-w-full border-collapse text-sm">
          <caption className="sr-only">Comparison of seeing at zenith and 500 nm, one row per {comparison.kind === "sites" ? "site" : "campaign"}; a star marks the best value in a column.</caption>
          <thead>
            <tr className="border-b border-line text-left align-bottom">
              <th scope="col" className="sticky left-0 z-10 bg-panel px-3 py-2 font-semibold">
                {comparison.kind === "sites" ? "Site" : "Campaign"}
              </th>
              {cols.map((column) => (
                <th key={column.id} scope="col" className="px-3 py-2 text-right font-semibold whitespace-nowrap">
                  {column.header}
                  {column.unit ? <span className="block text-xs font-normal text-ink-soft">({column.unit})</span> : null}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {comparison.rows.map((row, rowIndex) => (
              <RowWithWarnings key={row.key} row={row} rowIndex={rowIndex} cols={cols} best={best} span={cols.length + 1} />
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

function RowWithWarnings({ row, rowIndex, cols, best, span }: { row: ComparisonRow; rowIndex: number; cols: Column[]; best: Map<string, number | null>; span: number }) {
  return (
    <>
      <tr className="border-t border-line align-top">
        <th scope="row" className="sticky left-0 z-10 bg-panel px-3 py-2 text-left font-semibold">
          <span className="flex items-center gap-2">
            <LegendSwatch style={styleOf(rowIndex)} />
            <span className="max-w-[9rem] whitespace-normal">{row.label}</span>
          </span>
          {row.statistics === null ? <span className="block text-xs font-normal text-warn">no samples pass the window and filters</span> : null}
        </th>
        {cols.map((column) => {
          const isBest = best.get(column.id) === rowIndex;
          return (
            <td key={column.id} className={`num px-3 py-2 whitespace-nowrap ${isBest ? "font-bold" : ""}`}>
              {isBest ? (
                <span className="mr-1" title={`best: ${column.bestWords ?? ""}`}>
                  <span aria-hidden="true">★</span>
                  <span className="sr-only">best ({column.bestWords}): </span>
                </span>
              ) : null}
              {column.cell(row)}
            </td>
          );
        })}
      </tr>
      {row.warnings.length > 0 ? (
        <tr>
          <td colSpan={span} className="px-0 pb-3">
            <ul className="sticky left-0 w-[min(100%,calc(100vw-4rem))] max-w-3xl space-y-1 px-3 text-xs text-warn" aria-label={`Warnings for ${row.label}`}>
              {row.warnings.map((warning) => (
                <li key={`${warning.code}-${warning.message}`} className="flex gap-1.5">
                  <span aria-hidden="true">⚠</span>
                  <span>{warning.message}</span>
                </li>
              ))}
            </ul>
          </td>
        </tr>
      ) : null}
    </>
  );
}
