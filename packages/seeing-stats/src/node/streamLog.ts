import { isAscii } from 'node:buffer';
import { LogFormatError } from '../errors.js';
import { checkMapping } from '../log/checkMapping.js';
import type { TimeFormat } from '../log/parseTimeAs.js';
import { createRowReader, type LogSample, type MonitorSettings, type PlausibilityWindow, type RowRejectReason } from '../log/createRowReader.js';
import type { ColumnMapping, MappingOverrides } from '../log/logFields.js';
import { proposeMapping } from '../log/proposeMapping.js';
import { blankSample, createFastRowReader, type FastRowReader } from '../log/fastRowReader.js';
import { LogTextReader } from '../log/readLogText.js';
import { listHeaders } from '../log/splitLog.js';
import { delimiterName, layoutOf, WHITESPACE_DELIMITER, type LayoutChoices } from '../log/delimiters.js';
import type { SiteLocation } from '../log/sunAltitude.js';

export interface StreamLogOptions extends LayoutChoices {
  /** Fields whose header a person named (or null: not in the file); the rest are matched by name (proposeMapping). */
  mapping?: MappingOverrides;
  monitor: MonitorSettings;
  site?: SiteLocation;
  /** Overrides of the engine's default plausibility window. */
  plausibility?: Partial<PlausibilityWindow>;
  onProgress?: (bytesRead: number) => void;
  /** How the time column is written; ISO 8601 by default (createRowReader). */
  timeFormat?: TimeFormat;
  /** The zone of times that carry none, minutes east of UTC. */
  utcOffsetMinutes?: number;
  /**
   * True when onSample neither keeps the sample object past the call nor reads `fields`: plain rows then come in
   * one reused object and with no fields (an empty array), saving an object and a string per row.
   */
  transientSamples?: boolean;
}

export interface StreamLogHandlers {
  /** The header line was read and the mapping (the overrides given, the rest matched by name) checked; before any row. */
  onHeader?(headers: readonly string[], mapping: ColumnMapping): void;
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
  /** Data rows seen: every line after the header that is neither a comment nor blank, readable or not. */
  rowsRead: number;
  /** Every line of the file, comments, blank lines and the header included. */
  linesTotal: number;
  /** Lines above the header line a person named (headerLine), skipped as preamble; 0 without headerLine. */
  preambleLines: number;
}

/**
 * Streams a log through the engine's one text path (LogTextReader: lines cut at LF, CRLF or lone CR per line,
 * fields split strictly per line) and the row reader: headers from the first line that is neither blank nor a
 * '#' comment, delimiter detected from the first 64 KiB, memory bounded by one chunk plus one line of at most
 * MAX_LINE_CHARS. Calls onSample for each readable row and onReject for every other data line (with its 1-based
 * line), so rowsRead = samples + rejections = data lines. Duplicates are not handled here: the caller decides.
 * Throws LogFormatError when the file cannot be read at all (binary, UTF-16, no header, a repeated or
 * unsplittable header, mapping unusable), SeeingInputError for bad settings.
 */
export async function streamLog(input: NodeJS.ReadableStream, options: StreamLogOptions, handlers: StreamLogHandlers): Promise<StreamLogResult> {
  const decoder = new TextDecoder('utf-8');
  let bytesRead = 0;
  let mapping: ColumnMapping = {};
  let readRow: ReturnType<typeof createRowReader> | null = null;
  let readPlainRow: FastRowReader | null = null;
  const transient = options.transientSamples === true;
  const reused = blankSample();
  const noFields: readonly string[] = [];

  const reader = new LogTextReader({
    header(headers, delimiter, line) {
      joiner = delimiter === WHITESPACE_DELIMITER ? ' ' : delimiter;
      mapping = proposeMapping(headers, options.mapping);
      const problems = checkMapping(mapping, headers);
      if (problems.length > 0) {
        throw new LogFormatError(`Line ${line} (the header line) does not give the columns Calmcrest needs: ${problems[0] ?? ''}`, {
          line,
          hint: `${problems.slice(1).join(' ')} Headers found: ${listHeaders(headers)}. Rename the columns to the native names (README, "Log format") or map them with --map field=Header. The columns were split at ${delimiterName(delimiter)}${options.delimiter === undefined ? ' (detected)' : ''}: if the names above are cut at the wrong character, give the delimiter (--delimiter). If the column names stand on a later line below a text preamble, give that line (--header-line N).`.trim(),
        });
      }
      const readerOptions = {
        headers,
        mapping,
        monitor: options.monitor,
        site: options.site,
        delimiter,
        plausibility: options.plausibility,
        ...(options.timeFormat ? { timeFormat: options.timeFormat } : {}),
        ...(options.utcOffsetMinutes ? { utcOffsetMinutes: options.utcOffsetMinutes } : {}),
      };
      readRow = createRowReader(readerOptions);
      // Plain rows are read in place, the rest (and every rejection) by readRow; both give the same samples.
      readPlainRow = createFastRowReader(readerOptions);
      handlers.onHeader?.(headers, mapping);
    },
    row(fields, line, text) {
      if (readRow === null) return;
      const result = readRow(fields, line);
      if (result.ok) handlers.onSample(result.sample, line, fields, joiner);
      else handlers.onReject(line, result.reason, result.message, text);
    },
    rowIn(text, start, end, line) {
      if (readPlainRow === null) return false;
      const sample = readPlainRow(text, start, end, transient ? reused : blankSample());
      if (sample === null) return false;
      // Without transientSamples the fields join back into the line: one field holding it, delimiter ''.
      if (transient) handlers.onSample(sample, line, noFields, reader.delimiter);
      else handlers.onSample(sample, line, [text.slice(start, end)], '');
      return true;
    },
    badLine(line, reason, message, text) {
      handlers.onReject(line, reason, message, text);
    },
  }, layoutOf(options));
  // Fields of runs-of-blanks files are given back joined by one space.
  let joiner = ',';

  // An all-ASCII piece reads the same in UTF-8 and Latin-1, and Latin-1 copies the bytes straight into a string
  // (several times faster); only while the decoder holds no unfinished character from the piece before, and never
  // for the first piece (the decoder drops a byte-order mark only at the start of what it was given).
  let decoderIdle = false;
  for await (const chunk of input) {
    let text: string;
    if (typeof chunk === 'string') {
      text = chunk;
    } else if (decoderIdle && chunk instanceof Buffer && isAscii(chunk)) {
      text = chunk.toString('latin1');
    } else {
      text = decoder.decode(chunk, { stream: true });
      // A piece that ends in an ASCII byte leaves no character unfinished.
      decoderIdle = chunk.length === 0 || (chunk[chunk.length - 1] ?? 0) < 0x80;
    }
    bytesRead += typeof chunk === 'string' ? Buffer.byteLength(chunk) : chunk.length;
    reader.push(text);
    options.onProgress?.(bytesRead);
  }
  reader.push(decoder.decode());
  reader.end();

  const headers = reader.headers;
  if (headers === null) {
    throw new LogFormatError('The file is empty: it has no header line and no rows.', {
      line: null,
      hint: 'Export the log again; a Calmcrest log starts with a line of column names such as time_utc,seeing_arcsec,zenith_deg (README, "Log format").',
    });
  }
  return { headers, delimiter: reader.delimiter, mapping, rowsRead: reader.rowsRead, linesTotal: reader.lines, preambleLines: reader.preambleLines };
}
