import Papa from 'papaparse';
import { LogFormatError, SeeingInputError } from '../errors.js';
import { checkMapping } from './checkMapping.js';
import { createRowReader, type LogSample, type MonitorSettings } from './createRowReader.js';
import { detectDelimiter } from './detectDelimiter.js';
import type { ColumnMapping } from './logFields.js';
import { proposeMapping } from './proposeMapping.js';
import type { SiteLocation } from './sunAltitude.js';

export interface LogPreview {
  delimiter: string;
  headers: string[];
  proposedMapping: ColumnMapping;
  mappingProblems: string[];
  rows: { line: number; values: Record<string, string>; sample: LogSample | null; problem: string | null }[];
}

/** A row is a comment when its first field starts with '#'; a blank line is a lone empty field. */
export function isCommentOrBlank(fields: readonly string[]): boolean {
  const first = fields[0];
  if (first === undefined) return true;
  if (fields.length === 1 && first.trim() === '') return true;
  return first.trimStart().startsWith('#');
}

/**
 * Reads the start of a log held in memory (browser-safe: the upload wizard calls it on the first kilobytes):
 * the delimiter, the headers, a proposed mapping (or the one given) and its problems, and the first rows with
 * their samples or the reason each cannot be read. Uses the same papaparse settings and row reader as the
 * streaming path. Throws LogFormatError when there is no header line.
 */
export function previewLog(
  text: string,
  options: { mapping?: ColumnMapping; monitor: MonitorSettings; site?: SiteLocation; maxRows?: number },
): LogPreview {
  const maxRows = options.maxRows ?? 20;
  const cleaned = text.replace(/^\uFEFF/, '');
  const delimiter = detectDelimiter(cleaned.slice(0, 64 * 1024));
  const parsed = Papa.parse<string[]>(cleaned, { delimiter, header: false, skipEmptyLines: false, newline: cleaned.includes('\r\n') ? '\r\n' : '\n' });
  const rows = parsed.data;
  let headerRow = -1;
  for (let index = 0; index < rows.length; index += 1) {
    if (!isCommentOrBlank(rows[index] ?? [])) {
      headerRow = index;
      break;
    }
  }
  if (headerRow < 0) {
    throw new LogFormatError('The file has no header line.', { line: null, hint: 'Start the log with a line of column names such as time_utc,seeing_arcsec,zenith_deg.' });
  }
  const headers = (rows[headerRow] ?? []).map((header) => header.trim());
  const proposedMapping = options.mapping ?? proposeMapping(headers);
  const mappingProblems = checkMapping(proposedMapping, headers);
  let reader: ReturnType<typeof createRowReader> | null = null;
  let readerProblem: string | null = null;
  if (mappingProblems.length === 0) {
    try {
      reader = createRowReader({ headers, mapping: proposedMapping, monitor: options.monitor, site: options.site, delimiter });
    } catch (error) {
      if (error instanceof LogFormatError) readerProblem = `${error.message} ${error.hint}`;
      else if (error instanceof SeeingInputError) readerProblem = error.message;
      else throw error;
    }
  } else {
    readerProblem = mappingProblems[0] ?? null;
  }
  const previewRows: LogPreview['rows'] = [];
  for (let index = headerRow + 1; index < rows.length && previewRows.length < maxRows; index += 1) {
    const fields = rows[index] ?? [];
    if (isCommentOrBlank(fields)) continue;
    const line = index + 1; // rows are records; equal to lines unless a quoted field spans lines
    const values: Record<string, string> = {};
    headers.forEach((header, column) => {
      values[header] = fields[column] ?? '';
    });
    if (reader === null) {
      previewRows.push({ line, values, sample: null, problem: readerProblem });
      continue;
    }
    const result = reader(fields, line);
    previewRows.push(result.ok ? { line, values, sample: result.sample, problem: null } : { line, values, sample: null, problem: result.message });
  }
  return { delimiter, headers, proposedMapping, mappingProblems, rows: previewRows };
}
