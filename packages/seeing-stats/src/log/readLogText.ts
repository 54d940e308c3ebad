import { LogFormatError } from '../errors.js';
import { detectDelimiter } from './detectDelimiter.js';
import { WHITESPACE_DELIMITER } from './delimiters.js';
import { isCommentOrBlankLine, LineSplitter, MAX_LINE_CHARS, readHeaderLine, rejectNonText, splitFields, type LineRejectReason } from './splitLog.js';

/** Enough text to see the header and a few rows before choosing the delimiter, in characters. */
export const SNIFF_CHARS = 64 * 1024;

export interface LogTextHandlers {
  /** The header line was read (once, before any row). */
  header(headers: string[], delimiter: string, line: number): void;
  /** A data line split into fields; at least as many as the header names (extra fields are blank). */
  row(fields: string[], line: number, text: string): void;
  /** A data line that could not be split into fields; it counts as a row read. */
  badLine(line: number, reason: LineRejectReason, message: string, text: string): void;
  /**
   * Optional: a data line offered in place, before it is split (`text` from `start` to `end`), when the text around
   * it holds no quote and it is neither blank nor a comment. Returns true when it read the line as a row itself
   * (then it counts as a row read and nothing else is called for it), false to have it split and given to row()
   * or badLine() as usual; it must have no effect when it returns false.
   */
  rowIn?(text: string, start: number, end: number, line: number): boolean;
}

/** How a person says the text is laid out, when the reader should not guess. */
export interface LogLayout {
  /** The delimiter string (delimiterOfChoice); detected from the first lines when absent. */
  delimiter?: string | undefined;
  /**
   * 1-based line that names the columns: every line before it is preamble (counted in preambleLines, never a
   * row), whatever it holds. Absent: the first line that is neither blank nor a '#' comment.
   */
  headerLine?: number | undefined;
}

/**
 * Turns the text of a log, fed in pieces, into a header and rows: waits for the first SNIFF_CHARS to refuse
 * binary or UTF-16 files and detect the delimiter, then cuts lines (LineSplitter) and fields (splitFields).
 * Comments and blank lines are skipped; every other line after the header is exactly one row or one bad line,
 * so the rows read equal the data lines of the file. A LogLayout fixes the delimiter and/or the header line; the
 * lines above a named header line are preamble (preambleLines), so lines = preamble + header + data + comments. A line longer than MAX_LINE_CHARS is a bad line
 * (line_too_long) wherever it stands; a header line that long, or one with a quote problem or a repeated
 * name, throws LogFormatError.
 */
export class LogTextReader {
  private sniffed = '';
  private splitter: LineSplitter | null = null;
  private headerNames: string[] | null = null;
  private namedWidth = 0;
  private delimiterUsed = ',';
  /** Whether the piece being cut, or the one before it (whose unfinished line it completes), holds a '"'. */
  private quotesNear = true;
  private previousPieceQuoted = true;
  /** Data lines seen after the header (rows and bad lines), plus over-long lines before it. */
  rowsRead = 0;
  /** Lines before the header line a person named (LogLayout.headerLine), skipped unread. */
  preambleLines = 0;

  constructor(
    private readonly handlers: LogTextHandlers,
    private readonly layout: LogLayout = {},
  ) {}

  get headers(): string[] | null {
    return this.headerNames;
  }

  /** Lines cut so far, comments, blank lines and the header included. */
  get lines(): number {
    return this.splitter?.lines ?? 0;
  }

  get delimiter(): string {
    return this.delimiterUsed;
  }

  push(text: string): void {
    if (this.splitter !== null) {
      // One search per piece instead of one per line: most logs hold no quote at all.
      const quoted = text.includes('"');
      this.quotesNear = quoted || this.previousPieceQuoted;
      this.splitter.push(text);
      // An unfinished line reaching back before this piece keeps an earlier quote in view.
      this.previousPieceQuoted = quoted || (this.previousPieceQuoted && this.splitter.unfinishedChars > text.length);
      return;
    }
    this.sniffed += text;
    if (this.sniffed.length >= SNIFF_CHARS) this.start();
  }

  end(): void {
    if (this.splitter === null) this.start();
    this.quotesNear = true;
    this.splitter?.end();
    const headerLine = this.layout.headerLine;
    if (headerLine !== undefined && this.headerNames === null) {
      const lines = this.splitter?.lines ?? 0;
      throw new LogFormatError(`The header line was set to line ${headerLine}, but the file has only ${lines} ${lines === 1 ? 'line' : 'lines'}.`, {
        line: null,
        hint: 'Give the number of the line that names the columns (count from 1 at the top of the file), or leave it empty to take the first line that is not a # comment.',
      });
    }
  }

  private start(): void {
    const sample = this.sniffed;
    this.sniffed = '';
    rejectNonText(sample);
    this.delimiterUsed = this.layout.delimiter ?? detectDelimiter(withoutPreamble(sample, this.layout.headerLine).slice(0, SNIFF_CHARS));
    this.splitter = new LineSplitter({
      line: (text, line) => this.line(text, line),
      tooLong: (line, lengthChars, head) => this.tooLong(line, lengthChars, head),
      ...(this.handlers.rowIn === undefined ? {} : { lineIn: (text: string, start: number, end: number, line: number) => this.lineIn(text, start, end, line) }),
    });
    this.previousPieceQuoted = sample.includes('"');
    this.quotesNear = true;
    this.splitter.push(sample);
  }

  private lineIn(text: string, start: number, end: number, line: number): void {
    if (this.headerNames !== null && !this.quotesNear && end > start && this.handlers.rowIn !== undefined) {
      // isCommentOrBlankLine's test on the first character: anything else starts a data line.
      const first = text.charCodeAt(start);
      if (first !== 32 && first !== 9 && first !== 0xfeff && first !== 0xa0 && first !== 35 && this.handlers.rowIn(text, start, end, line)) {
        this.rowsRead += 1;
        return;
      }
    }
    this.line(start === 0 && end === text.length ? text : text.slice(start, end), line);
  }

  private line(text: string, line: number): void {
    const headerLine = this.layout.headerLine;
    if (headerLine !== undefined && this.headerNames === null) {
      if (line < headerLine) {
        this.preambleLines += 1;
        return;
      }
      if (isCommentOrBlankLine(text)) {
        throw new LogFormatError(`Line ${line}, set as the header line, is ${text.trim() === '' ? 'blank' : 'a # comment'}: it does not name the columns.`, {
          line,
          hint: `Give the number of the line that holds the column names (the first lines of the file are shown beside the mapping), or leave the header line empty to take the first line that is not a # comment.`,
        });
      }
    } else if (isCommentOrBlankLine(text)) return;
    const delimiter = this.delimiterUsed;
    if (this.headerNames === null) {
      const headers = readHeaderLine(text, delimiter, line);
      this.headerNames = headers;
      let width = headers.length;
      while (width > 0 && headers[width - 1] === '') width -= 1;
      this.namedWidth = width;
      this.handlers.header(headers, delimiter, line);
      return;
    }
    this.rowsRead += 1;
    let fields: string[];
    if (this.quotesNear || delimiter === WHITESPACE_DELIMITER) {
      const split = splitFields(text, delimiter);
      if (!split.ok) {
        this.handlers.badLine(line, split.reason, split.message, text);
        return;
      }
      fields = split.fields;
    } else {
      fields = text.split(delimiter);
    }
    const columns = this.headerNames.length;
    if (fields.length < this.namedWidth || (fields.length > columns && !extraFieldsBlank(fields, columns))) {
      this.handlers.badLine(
        line,
        'wrong_field_count',
        `the line has ${fields.length} fields, the header names ${columns} columns; a delimiter inside a value (e.g. a decimal comma in a comma-separated file) or a cut line shifts every column after it`,
        text,
      );
      return;
    }
    this.handlers.row(fields, line, text);
  }

  private tooLong(line: number, lengthChars: number, head: string): void {
    if (this.layout.headerLine !== undefined && line < this.layout.headerLine) {
      this.preambleLines += 1;
      return;
    }
    if (this.headerNames === null && !isCommentOrBlankLine(head)) {
      throw new LogFormatError(`Line ${line} (the header line) is ${lengthChars} characters long, more than the ${MAX_LINE_CHARS} a line may have.`, {
        line,
        hint: 'Check that the file is a seeing log with one sample per line; a header names a few dozen columns at most.',
      });
    }
    this.rowsRead += 1;
    this.handlers.badLine(line, 'line_too_long', `the line is ${lengthChars} characters long, more than the ${MAX_LINE_CHARS} a line may have; it was skipped unread`, `${head}…`);
  }
}

function extraFieldsBlank(fields: readonly string[], from: number): boolean {
  for (let index = from; index < fields.length; index += 1) {
    if ((fields[index] ?? '').trim() !== '') return false;
  }
  return true;
}

/** The text from the header line on, so the delimiter is guessed from the columns and not from a preamble. */
function withoutPreamble(sample: string, headerLine: number | undefined): string {
  if (headerLine === undefined || headerLine <= 1) return sample;
  let position = 0;
  for (let line = 1; line < headerLine; line += 1) {
    const lf = sample.indexOf('\n', position);
    const cr = sample.indexOf('\r', position);
    const end = lf < 0 ? cr : cr < 0 ? lf : Math.min(lf, cr);
    if (end < 0) return '';
    position = end + (sample.charCodeAt(end) === 13 && sample.charCodeAt(end + 1) === 10 ? 2 : 1);
  }
  return sample.slice(position);
}
