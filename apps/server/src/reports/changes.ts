import type { ChangedFigure, ComparisonResponse, ComparisonRow, ReportSection, VersionChanges } from "@calmcrest/contracts";

// "What changed since version N": the numbers that moved between two frozen comparisons and by how much, the
// rows added or dropped, and the sections whose title or text changed. Pure: it reads two stored versions.

export interface VersionContent {
  number: number;
  title: string;
  summary: string;
  sections: ReportSection[];
  comparison: ComparisonResponse;
  uploadIds: number[];
}

type FigureSpec = { figure: string; unit: ChangedFigure["unit"]; read: (row: ComparisonRow) => number | null | undefined };

/** The figures of a row that a reader compares between versions, in the order they are listed. */
function rowFigures(row: ComparisonRow): FigureSpec[] {
  const thresholds = Object.keys(row.statistics?.fractionBelow ?? {});
  return [
    { figure: "median seeing (″)", unit: "arcsec", read: (r) => r.statistics?.seeing.median },
    { figure: "mean seeing (″)", unit: "arcsec", read: (r) => r.statistics?.seeing.mean },
    { figure: "10th percentile seeing (″)", unit: "arcsec", read: (r) => r.statistics?.seeing.p10 },
    { figure: "25th percentile seeing (″)", unit: "arcsec", read: (r) => r.statistics?.seeing.p25 },
    { figure: "75th percentile seeing (″)", unit: "arcsec", read: (r) => r.statistics?.seeing.p75 },
    { figure: "90th percentile seeing (″)", unit: "arcsec", read: (r) => r.statistics?.seeing.p90 },
    { figure: "season-balanced median (″)", unit: "arcsec", read: (r) => r.statistics?.seasonBalanced.medianArcsec },
    { figure: "median of nightly medians (″)", unit: "arcsec", read: (r) => r.statistics?.nightlyMedians.median },
    { figure: "median r0 (cm)", unit: "cm", read: (r) => r.statistics?.r0.median },
    ...thresholds.map((threshold): FigureSpec => ({ figure: `time below ${threshold}″`, unit: "fraction", read: (r) => r.statistics?.fractionBelow[threshold] })),
    { figure: "nights", unit: "count", read: (r) => r.statistics?.nights ?? 0 },
    { figure: "samples", unit: "count", read: (r) => r.statistics?.samples ?? 0 },
  ];
}

/** Differences below this are rounding noise of a recomputation, not a change (well under the 0.01″ shown). */
const SAME_WITHIN = 1e-9;

function moved(before: number | null, after: number | null): boolean {
  if (before === null || after === null) return before !== after;
  return Math.abs(after - before) > SAME_WITHIN;
}

const numberOrNull = (value: number | null | undefined) => (value === undefined || value === null || !Number.isFinite(value) ? null : value);

export function versionChanges(older: VersionContent, newer: VersionContent): VersionChanges {
  const figures: ChangedFigure[] = [];
  const olderRows = new Map(older.comparison.rows.map((row) => [row.key, row]));
  const newerRows = new Map(newer.comparison.rows.map((row) => [row.key, row]));
  for (const row of newer.comparison.rows) {
    const previous = olderRows.get(row.key);
    if (!previous) continue;
    for (const spec of rowFigures(row)) {
      const before = numberOrNull(spec.read(previous));
      const after = numberOrNull(spec.read(row));
      if (moved(before, after)) figures.push({ subject: row.label, figure: spec.figure, unit: spec.unit, before, after, change: before === null || after === null ? null : after - before });
    }
  }
  const olderPairs = new Map(older.comparison.pairs.map((pair) => [`${pair.aKey}|${pair.bKey}`, pair]));
  for (const pair of newer.comparison.pairs) {
    const previous = olderPairs.get(`${pair.aKey}|${pair.bKey}`);
    if (!previous) continue;
    const subject = `${newerRows.get(pair.aKey)?.label ?? pair.aKey} − ${newerRows.get(pair.bKey)?.label ?? pair.bKey}`;
    const specs: { figure: string; unit: ChangedFigure["unit"]; read: (p: typeof pair) => number | null | undefined }[] = [
      { figure: "difference of medians on common nights (″)", unit: "arcsec", read: (p) => p.paired?.medianDifferenceArcsec },
      { figure: "common nights", unit: "count", read: (p) => p.paired?.commonNights },
    ];
    for (const spec of specs) {
      const before = numberOrNull(spec.read(previous));
      const after = numberOrNull(spec.read(pair));
      if (moved(before, after)) figures.push({ subject, figure: spec.figure, unit: spec.unit, before, after, change: before === null || after === null ? null : after - before });
    }
  }

  const sections: VersionChanges["sections"] = [];
  const olderSections = new Map(older.sections.map((section) => [section.id, section]));
  const newerIds = new Set(newer.sections.map((section) => section.id));
  for (const section of newer.sections) {
    const previous = olderSections.get(section.id);
    if (!previous) {
      sections.push({ id: section.id, title: section.title, change: "added" });
      continue;
    }
    const renamed = previous.title !== section.title;
    const rewritten = previous.body !== section.body;
    if (renamed || rewritten) {
      sections.push({ id: section.id, title: section.title, change: renamed && rewritten ? "renamed_and_text" : renamed ? "renamed" : "text", ...(renamed ? { previousTitle: previous.title } : {}) });
    }
  }
  for (const section of older.sections) if (!newerIds.has(section.id)) sections.push({ id: section.id, title: section.title, change: "removed" });

  const olderUploads = new Set(older.uploadIds);
  return {
    fromVersion: older.number,
    toVersion: newer.number,
    titleChanged: older.title !== newer.title,
    summaryChanged: older.summary !== newer.summary,
    figures,
    subjectsAdded: newer.comparison.rows.filter((row) => !olderRows.has(row.key)).map((row) => row.label),
    subjectsRemoved: older.comparison.rows.filter((row) => !newerRows.has(row.key)).map((row) => row.label),
    sections,
    uploadsAdded: newer.uploadIds.filter((id) => !olderUploads.has(id)).length,
  };
}
