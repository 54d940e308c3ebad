import Papa from 'papaparse';
import { LogFormatError } from '../errors.js';
import { checkMapping } from '../log/checkMapping.js';
import { createRowReader, type LogSample, type MonitorSettings, type RowRejectReason } from '../log/createRowReader.js';
import { detectDelimiter } from '../log/detectDelimiter.js';
import type { ColumnMapping } from '../log/logFields.js';
import { isCommentOrBlank } from '../log/previewLog.js';
import { proposeMapping } from '../log/proposeMapping.js';
import type { SiteLocation } from '../log/sunAltitude.js';

export interface StreamLogOptions {
  /** Field → header; proposed from the headers when absent. */
  mapping?: ColumnMapping;
  monitor: MonitorSettings;
  site?: SiteLocation;
  onProgress?: (bytesRead: number) => void;
}

export interface StreamLogHandlers {
  /**
   * A readable row. `fields` and `delimiter` give the row's text back (`fields.join(delimiter)`) for a caller that
   * rejects it later, e.g. as a duplicate; passed as they are so accepted rows cost no string building.
   */
  onSample(sample: LogSample, line: number, fields: readonly string[], delimiter: string): void;
  onReject(line: number, reason: RowRejectReason, message: string, rawLine: string): void;
}

export interface StreamLogResult {
  headers: string[];
  delimiter: string;
  mapping: ColumnMapping;
  /** Data rows seen (comments and blank lines not counted). */
  rowsRead: number;
}

/** Enough text to see the header and a few rows before choosing the delimiter. */
const SNIFF_CHARS = 64 * 1024;

/**
 * Streams a log through papaparse (the project's one CSV path) and the row reader: headers from the first
 * line that is neither blank nor a '#' comment, delimiter detected from the first 64 KiB, memory bounded by one
 * chunk. Calls onSample for each readable row and onReject for each other row (with its 1-based line).
 * Duplicates are not handled here: the caller decides. Throws LogFormatError when the file cannot be read at
 * all (binary, no header, mapping unusable), SeeingInputError for bad settings.
 */
export async function streamLog(input: NodeJS.ReadableStream, options: StreamLogOptions, handlers: StreamLogHandlers): Promise<StreamLogResult> {
  const decoder = new TextDecoder('utf-8');
  let pending = '';
  let bytesRead = 0;
  let recordsSeen = 0; // records so far; the line of a record is recordsSeen + 1 (unless quoted fields span lines)
  let rowsRead = 0;
  let parser: Papa.Parser | null = null;
  let delimiter = ',';
  let headers: string[] | null = null;
  let mapping: ColumnMapping = {};
  let readRow: ReturnType<typeof createRowReader> | null = null;

  const handleRows = (rows: string[][]): void => {
    for (const fields of rows) {
      recordsSeen += 1;
      const line = recordsSeen;
      if (isCommentOrBlank(fields)) continue;
      if (readRow === null) {
        headers = fields.map((header) => header.trim());
        mapping = options.mapping ?? proposeMapping(headers);
        const problems = checkMapping(mapping, headers);
        if (problems.length > 0) {
          throw new LogFormatError(`Line ${line} (the header line) does not give the columns Calmcrest needs: ${problems[0] ?? ''}`, {
            line,
            hint: `${problems.slice(1).join(' ')} Headers found: ${headers.map((header) => `"${header}"`).join(', ')}. Rename the columns to the native names (README, "Log format") or map them with --map field=Header.`.trim(),
          });
        }
        readRow = createRowReader({ headers, mapping, monitor: options.monitor, site: options.site, delimiter });
        continue;
      }
      rowsRead += 1;
      const result = readRow(fields, line);
      if (result.ok) handlers.onSample(result.sample, line, fields, delimiter);
      else handlers.onReject(line, result.reason, result.message, fields.join(delimiter));
    }
  };

  const consume = (text: string, isLast: boolean): void => {
    if (parser === null) {
      if (!isLast && text.length < SNIFF_CHARS) {
        pending = text;
        return;
      }
      rejectBinary(text);
      const start = text.replace(/^\uFEFF/, '');
      delimiter = detectDelimiter(start.slice(0, SNIFF_CHARS));
      const firstNewline = start.indexOf('\n');
      const newline = firstNewline > 0 && start.charCodeAt(firstNewline - 1) === 13 ? '\r\n' : firstNewline < 0 && start.includes('\r') ? '\r' : '\n';
      parser = new Papa.Parser({ delimiter, newline, header: false, skipEmptyLines: false });
      text = start;
    }
    const results = parser.parse(text, 0, !isLast) as { data: string[][]; meta: { cursor: number } };
    pending = isLast ? '' : text.slice(results.meta.cursor);
    handleRows(results.data);
  };

  for await (const chunk of input) {
    const text = typeof chunk === 'string' ? chunk : decoder.decode(chunk, { stream: true });
    bytesRead += typeof chunk === 'string' ? Buffer.byteLength(chunk) : chunk.length;
    consume(pending + text, false);
    options.onProgress?.(bytesRead);
  }
  consume(pending + decoder.decode(), true);

  if (headers === null) {
    throw new LogFormatError('The file is empty: it has no header line and no rows.', {
      line: null,
      hint: 'Export the log again; a Calmcrest log starts with a line of column names such as time_utc,seeing_arcsec,zenith_deg (README, "Log format").',
    });
  }
  return { headers, delimiter, mapping, rowsRead };
}

/** A log is text: NUL bytes or many undecodable bytes at the start mean a binary file was picked. */
function rejectBinary(text: string): void {
  const sample = text.slice(0, SNIFF_CHARS);
  let suspicious = 0;
  let firstSuspicious = -1;
  for (let index = 0; index < sample.length; index += 1) {
    const code = sample.charCodeAt(index);
    if (code === 0 || code === 0xfffd || (code < 32 && code !== 9 && code !== 10 && code !== 13)) {
      suspicious += 1;
      if (firstSuspicious < 0) firstSuspicious = index;
    }
  }
  if (suspicious > 0 && (sample.includes('\u0000') || suspicious > sample.length / 100)) {
    const line = sample.slice(0, firstSuspicious).split('\n').length;
    throw new LogFormatError(`The file is not a text log: line ${line} holds binary data (${suspicious} unreadable characters in the first ${sample.length}).`, {
      line,
      hint: 'Pick the monitor\'s exported text log (CSV, semicolon- or tab-separated), not an image, archive or spreadsheet file.',
    });
  }
}
