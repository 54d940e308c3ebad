import type { TimeFormat } from './parseTimeAs.js';
import { LogFormatError, SeeingInputError } from '../errors.js';
import { checkMapping } from './checkMapping.js';
import { createRowReader, type LogSample, type MonitorSettings, type PlausibilityWindow } from './createRowReader.js';
import type { ColumnMapping, MappingOverrides } from './logFields.js';
import { proposeMapping } from './proposeMapping.js';
import { LogTextReader } from './readLogText.js';
import { layoutOf, type DelimiterChoice } from './delimiters.js';
import type { SiteLocation } from './sunAltitude.js';

export interface LogPreview {
  delimiter: string;
  /** Lines above the header line given in the options, skipped as preamble. */
  preambleLines: number;
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

/** Thrown inside the reader's handlers once enough rows are listed. */
class PreviewFull extends Error {}

/**
 * Reads the start of a log held in memory (browser-safe: the upload wizard calls it on the first kilobytes):
 * the delimiter, the headers, the mapping (overrides given for some fields, the rest matched by name) and its problems, and the first rows with
 * their samples or the reason each cannot be read. Uses the same text reader (line ends, quotes, limits) and
 * row reader as the streaming path, so a line rejected there is shown with the same problem here. Throws
 * LogFormatError when there is no usable header line or the text is not UTF-8.
 */
export function previewLog(
  text: string,
  options: {
    mapping?: MappingOverrides;
    monitor: MonitorSettings;
    site?: SiteLocation;
    maxRows?: number;
    plausibility?: Partial<PlausibilityWindow>;
    /** How the time column is written (createRowReader); ISO 8601 by default. */
    timeFormat?: TimeFormat;
    utcOffsetMinutes?: number;
    /** The delimiter a person chose (detected when absent). */
    delimiter?: DelimiterChoice | undefined;
    /** 1-based line of the column names; the lines above it are preamble. */
    headerLine?: number | undefined;
  },
): LogPreview {
  const maxRows = options.maxRows ?? 20;
  let headers: string[] = [];
  let proposedMapping: ColumnMapping = {};
  let mappingProblems: string[] = [];
  let reader: ReturnType<typeof createRowReader> | null = null;
  let readerProblem: string | null = null;
  const rows: LogPreview['rows'] = [];
  const valuesOf = (fields: readonly string[]): Record<string, string> => {
    const values: Record<string, string> = {};
    headers.forEach((header, column) => {
      values[header] = fields[column] ?? '';
    });
    return values;
  };
  const add = (row: LogPreview['rows'][number]): void => {
    if (rows.length >= maxRows) throw new PreviewFull();
    rows.push(row);
  };

  const textReader = new LogTextReader({
    header(found, delimiter) {
      headers = found;
      proposedMapping = proposeMapping(headers, options.mapping);
      mappingProblems = checkMapping(proposedMapping, headers);
      if (mappingProblems.length > 0) {
        readerProblem = mappingProblems[0] ?? null;
        return;
      }
      try {
        reader = createRowReader({
          headers,
          mapping: proposedMapping,
          monitor: options.monitor,
          site: options.site,
          delimiter,
          plausibility: options.plausibility,
          ...(options.timeFormat ? { timeFormat: options.timeFormat } : {}),
          ...(options.utcOffsetMinutes ? { utcOffsetMinutes: options.utcOffsetMinutes } : {}),
        });
      } catch (error) {
        if (error instanceof LogFormatError) readerProblem = `${error.message} ${error.hint}`;
        else if (error instanceof SeeingInputError) readerProblem = error.message;
        else throw error;
      }
      if (maxRows <= 0) throw new PreviewFull();
    },
    row(fields, line) {
      const values = valuesOf(fields);
      if (reader === null) {
        add({ line, values, sample: null, problem: readerProblem });
        return;
      }
      const result = reader(fields, line);
      add(result.ok ? { line, values, sample: result.sample, problem: null } : { line, values, sample: null, problem: result.message });
    },
    badLine(line, reason, message) {
      add({ line, values: {}, sample: null, problem: `${reason.replaceAll('_', ' ')}: ${message}` });
    },
  }, layoutOf(options));
  try {
    textReader.push(text);
    textReader.end();
  } catch (error) {
    if (!(error instanceof PreviewFull)) throw error;
  }
  if (textReader.headers === null) {
    throw new LogFormatError('The file has no header line.', { line: null, hint: 'Start the log with a line of column names such as time_utc,seeing_arcsec,zenith_deg.' });
  }
  return { delimiter: textReader.delimiter, preambleLines: textReader.preambleLines, headers, proposedMapping, mappingProblems, rows };
}
