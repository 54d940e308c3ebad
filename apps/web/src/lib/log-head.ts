import { LogFormatError, previewLog, type ColumnMapping, type LayoutChoices, type LogField, type LogPreview, type MonitorSettings } from "@calmcrest/seeing-stats";

/** The first part of a log file as the browser reads it, before anything is sent. */
export interface LogHead {
  delimiter: string;
  /** Lines above the header line named in the layout, skipped as preamble. */
  preambleLines: number;
  headers: string[];
  /** First data rows, header -> text. */
  rows: Record<string, string>[];
  proposedMapping: ColumnMapping;
}

/** Bytes read from each file for the header and first rows (a few hundred lines of a typical log). */
export const HEAD_BYTES = 64 * 1024;

/** Monitor settings for reading the head only: the rows' values and the proposal do not depend on them. */
const HEAD_MONITOR: MonitorSettings = { wavelengthNm: 500, response: "z-tilt" };

/**
 * Reads the header line and first rows of a log's opening text through the engine's previewLog, the one reading
 * path of preview, ingest, analyzer and wizard (line ends per line, strict quotes, repeated headers and UTF-16
 * refused), skipping '#' comments, blank lines and lines that cannot be split, and proposes a mapping from the
 * header names. `layout` is the person's delimiter and header line, when the file should not be guessed.
 */
export function readLogHead(text: string, maxRows = 8, layout: LayoutChoices = {}): LogHead {
  // The slice may end mid-line; drop the partial last line so it is not shown as a broken row.
  const lastEnd = Math.max(text.lastIndexOf("\n"), text.lastIndexOf("\r"));
  const complete = lastEnd < 0 || lastEnd === text.length - 1 ? text : text.slice(0, lastEnd + 1);
  let preview: LogPreview;
  try {
    // Lines that cannot be split are listed by previewLog too; read enough to show maxRows good ones.
    preview = previewLog(complete, { monitor: HEAD_MONITOR, maxRows: maxRows * 4, delimiter: layout.delimiter, headerLine: layout.headerLine });
  } catch (error) {
    if (error instanceof LogFormatError) {
      if (error.line === null && /no header line/.test(error.message)) {
        throw new Error("The file has no header line: the first line that is not a comment must name the columns.");
      }
      throw new Error(`${error.message} ${error.hint}`);
    }
    throw error;
  }
  const rows = preview.rows
    .filter((row) => Object.keys(row.values).length > 0)
    .slice(0, maxRows)
    .map((row) => Object.fromEntries(Object.entries(row.values).map(([header, value]) => [header, value.trim()])));
  return { delimiter: preview.delimiter, preambleLines: preview.preambleLines, headers: preview.headers, rows, proposedMapping: preview.proposedMapping };
}

export type VarianceUnit = "arcsec2" | "px2";
export type PointingKind = "zenith" | "airmass";

/** The variance fields of each unit, in matching order: base exposure, then twice the exposure time (optional). */
const VARIANCE_FIELDS: Record<VarianceUnit, readonly LogField[]> = {
  arcsec2: ["var_long_arcsec2", "var_trans_arcsec2", "var_long_2x_arcsec2", "var_trans_2x_arcsec2"],
  px2: ["var_long_px2", "var_trans_px2", "var_long_2x_px2", "var_trans_2x_px2"],
};
const POINTING_FIELD: Record<PointingKind, LogField> = { zenith: "zenith_deg", airmass: "airmass" };

/** The units a mapping implies: variances in arcsec² or pixel², pointing as zenith angle or airmass. */
export function unitsOfMapping(mapping: ColumnMapping): { variance: VarianceUnit; pointing: PointingKind } {
  return {
    variance: VARIANCE_FIELDS.px2.some((field) => mapping[field] !== undefined) ? "px2" : "arcsec2",
    pointing: mapping.airmass !== undefined && mapping.zenith_deg === undefined ? "airmass" : "zenith",
  };
}

/**
 * The same columns read in other units: the variance columns (and those at twice the exposure time) move between
 * the arcsec² and pixel² fields, the pointing column between zenith angle and airmass. Other fields stay as they are.
 */
export function withUnits(mapping: ColumnMapping, units: { variance: VarianceUnit; pointing: PointingKind }): ColumnMapping {
  const next: ColumnMapping = { ...mapping };
  const fields = VARIANCE_FIELDS[units.variance];
  const otherFields = VARIANCE_FIELDS[units.variance === "px2" ? "arcsec2" : "px2"];
  fields.forEach((field, index) => {
    const otherField = otherFields[index];
    if (otherField === undefined) return;
    const header = next[field] ?? next[otherField];
    delete next[otherField];
    if (header !== undefined) next[field] = header;
  });
  const pointingField = POINTING_FIELD[units.pointing];
  const otherPointing = POINTING_FIELD[units.pointing === "zenith" ? "airmass" : "zenith"];
  const pointingHeader = next[pointingField] ?? next[otherPointing];
  delete next[otherPointing];
  if (pointingHeader !== undefined) next[pointingField] = pointingHeader;
  return next;
}

/** A saved mapping is offered only if every header it names is in this file. */
export const mappingFitsHeaders = (mapping: ColumnMapping, headers: readonly string[]) =>
  Object.values(mapping).every((header) => header === undefined || headers.includes(header));
