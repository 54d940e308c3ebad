import { spreadsheetSafeCsv, type ComparisonResponse, type CsvCell } from "@calmcrest/contracts";

const THRESHOLDS = ["0.6", "0.8", "1.0"] as const;

/** A `#` line of the header block: one cell (no commas or quotes), so a spreadsheet shows it whole and a reader can skip it. */
const headerLine = (text: string) => `# ${text.replaceAll(",", ";").replaceAll('"', "'").replaceAll(/[\r\n]+/g, " ")}`;

const round = (value: number | null | undefined, decimals: number): CsvCell => (value === null || value === undefined || !Number.isFinite(value) ? "" : Number(value.toFixed(decimals)));

/**
 * The comparison table as a CSV download: a block of `#` lines naming the window, filters, coefficient sets, planned
 * telescope, pairing and generation time, then a row per site and a row per pair. Every cell goes through
 * spreadsheetSafeCsv, so a cell starting with =, +, -, @, tab or CR (a negative difference, a hostile name) is
 * prefixed with an apostrophe and a spreadsheet never runs it.
 */
export function comparisonCsv(comparison: ComparisonResponse): string {
  const { filters, telescope } = comparison;
  const header = [
    "Calmcrest site comparison (seeing at zenith and 500 nm; arcsec unless stated)",
    `generated ${comparison.generatedAt}`,
    `window: ${comparison.window.from ?? "first sample"} to ${comparison.window.to ?? "last sample"} (UTC)`,
    `filters: zenith limit ${filters.maxZenithDeg} deg; sun limit ${filters.sunMaxDeg} deg; flux minimum ${filters.minFlux ?? "none"}${filters.standard ? " (the standard filters)" : " (not the standard filters)"}`,
    `coefficient sets: ${comparison.coefficientSets.join("; ")}`,
    `planned telescope: aperture ${telescope.apertureM === null ? "not given (large telescope)" : `${telescope.apertureM} m`}; band ${telescope.bandNm} nm; outer scale L0 ${telescope.outerScaleM} m; ${telescope.method}`,
    `paired figures: ${comparison.method.paired}; bootstrap ${comparison.method.bootstrap.replicates} replicates; seed ${comparison.method.bootstrap.seed}`,
    `season-balanced median: ${comparison.method.seasonBalanced}`,
  ].map(headerLine);

  const rowHeader: CsvCell[] = [
    "row",
    "campaigns",
    "monitor heights (m)",
    "response sets",
    "samples",
    "nights",
    "median",
    "median 95% low",
    "median 95% high",
    "p10",
    "p25",
    "p75",
    "p90",
    "season-balanced median",
    "months missing",
    "median r0 (cm)",
    ...THRESHOLDS.flatMap((threshold) => [`time below ${threshold} (%)`, `below ${threshold} 95% low (%)`, `below ${threshold} 95% high (%)`]),
    "log-normal mu",
    "log-normal sigma",
    "KS distance",
    "predicted FWHM p25",
    "predicted FWHM median",
    "predicted FWHM p75",
    "warnings",
  ];
  const rows: CsvCell[][] = comparison.rows.map((row) => {
    const stats = row.statistics;
    const percent = (value: number | null | undefined): CsvCell => round(value === null || value === undefined ? null : value * 100, 1);
    return [
      row.label,
      row.campaigns.map((campaign) => campaign.name).join("; "),
      row.campaigns.map((campaign) => campaign.heightAboveGroundM ?? "unknown").join("; "),
      [...new Set(row.campaigns.map((campaign) => campaign.responseName))].join("; "),
      stats?.samples ?? 0,
      stats?.nights ?? 0,
      round(stats?.seeing.median, 3),
      round(stats?.seeing.medianCi95?.[0], 3),
      round(stats?.seeing.medianCi95?.[1], 3),
      round(stats?.seeing.p10, 3),
      round(stats?.seeing.p25, 3),
      round(stats?.seeing.p75, 3),
      round(stats?.seeing.p90, 3),
      round(stats?.seasonBalanced.medianArcsec, 3),
      stats?.seasonBalanced.monthsMissing.join("; ") ?? "",
      round(stats?.r0.median, 2),
      ...THRESHOLDS.flatMap((threshold) => [percent(stats?.fractionBelow[threshold]), percent(stats?.fractionBelowCi95[threshold]?.[0]), percent(stats?.fractionBelowCi95[threshold]?.[1])]),
      round(stats?.lognormal.mu, 4),
      round(stats?.lognormal.sigma, 4),
      round(stats?.lognormal.ks, 4),
      round(stats?.telescope.p25, 3),
      round(stats?.telescope.median, 3),
      round(stats?.telescope.p75, 3),
      row.warnings.map((warning) => warning.message).join(" | "),
    ];
  });
  const pairHeader: CsvCell[] = [
    "pair: A",
    "B",
    "common nights",
    "paired A − B median",
    "paired 95% low",
    "paired 95% high",
    "Wilcoxon signed-rank p",
    "verdict",
    "unpaired A − B median",
    "unpaired 95% low",
    "unpaired 95% high",
    "Mann–Whitney p",
    "warnings",
  ];
  const pairRows: CsvCell[][] = comparison.pairs.map((pair) => [
    comparison.rows[pair.a]?.label ?? pair.aKey,
    comparison.rows[pair.b]?.label ?? pair.bKey,
    pair.paired?.commonNights ?? 0,
    round(pair.paired?.medianDifferenceArcsec, 3),
    round(pair.paired?.ci95?.[0], 3),
    round(pair.paired?.ci95?.[1], 3),
    pair.paired?.wilcoxon ? Number(pair.paired.wilcoxon.pValue.toPrecision(3)) : "",
    pair.paired?.sentence ?? "no samples at one of the two",
    round(pair.unpaired?.medianDifferenceArcsec, 3),
    round(pair.unpaired?.ci95[0], 3),
    round(pair.unpaired?.ci95[1], 3),
    pair.unpaired ? Number(pair.unpaired.mannWhitney.pValue.toPrecision(3)) : "",
    pair.warnings.map((warning) => warning.message).join(" | "),
  ]);
  const general = comparison.warnings.map((warning) => headerLine(`warning: ${warning.message}`));
  return `${[...header, ...general].join("\n")}\n${spreadsheetSafeCsv([rowHeader, ...rows, [], pairHeader, ...pairRows])}`;
}

/** A file name for the download: calmcrest-comparison-2026-12-05.csv. */
export const comparisonFileName = (comparison: ComparisonResponse) => `calmcrest-comparison-${comparison.generatedAt.slice(0, 10)}.csv`;
