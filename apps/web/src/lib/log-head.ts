import Papa from "papaparse";
import { detectDelimiter, isCommentOrBlank, proposeMapping, type ColumnMapping, type LogField } from "@calmcrest/seeing-stats";

/** The first part of a log file as the browser reads it, before anything is sent. */
export interface LogHead {
  delimiter: string;
  headers: string[];
  /** First data rows, header -> text. */
  rows: Record<string, string>[];
  proposedMapping: ColumnMapping;
}

/** Bytes read from each file for the header and first rows (a few hundred lines of a typical log). */
export const HEAD_BYTES = 64 * 1024;

/**
 * Reads the header line and first rows of a log's opening text with papaparse, skipping '#' comments and blank
 * lines like the server does, and proposes a mapping from the header names with the engine's rules.
 */
export function readLogHead(text: string, maxRows = 8): LogHead {
  // The slice may end mid-line; drop the partial last line so it is not shown as a broken row.
  const lines = text.split(/\r?\n/);
  if (!text.endsWith("\n") && lines.length > 1) lines.pop();
  // A comment is a line whose first field starts with '#'; checked on the raw line so it does not depend on the delimiter.
  const content = lines.filter((line) => !isCommentOrBlank([line.trim()]));
  const headerLine = content[0];
  if (headerLine === undefined) throw new Error("The file has no header line: the first line that is not a comment must name the columns.");
  const delimiter = detectDelimiter(content.slice(0, 5).join("\n"));
  const parsed = Papa.parse<string[]>(content.slice(0, maxRows + 1).join("\n"), { delimiter, skipEmptyLines: true });
  const [headerFields = [], ...dataRows] = parsed.data;
  const headers = headerFields.map((header) => header.trim());
  const rows = dataRows.map((fields) => Object.fromEntries(headers.map((header, index) => [header, (fields[index] ?? "").trim()])));
  return { delimiter, headers, rows, proposedMapping: proposeMapping(headers) };
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
