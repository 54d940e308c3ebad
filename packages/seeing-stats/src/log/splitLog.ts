import { LogFormatError } from '../errors.js';
import { splitWhitespace, WHITESPACE_DELIMITER } from './delimiters.js';

// The one way Calmcrest cuts a log into lines and a line into fields (browser-safe; streamLog and previewLog
// both use it). A record never spans lines: a line is judged on its own, so one bad line costs one row.

/**
 * Longest line read, in characters (UTF-16 code units; 1 MiB of ASCII text). A longer line is rejected as
 * `line_too_long` without being kept in memory: only its first characters are remembered for the message.
 */
export const MAX_LINE_CHARS = 1_048_576;
/** How much of an over-long line is kept for the rejected-row listing, in characters. */
export const REJECTED_LINE_HEAD_CHARS = 200;
/** How many header names an error message lists before "… and N more". */
export const LISTED_HEADERS = 20;
/** How many characters of one header name an error message shows. */
const LISTED_HEADER_CHARS = 60;

/** Why a line could not be split into fields (it still counts as a row read). */
export type LineRejectReason = 'unterminated_quote' | 'stray_quote' | 'line_too_long' | 'wrong_field_count';

export const LINE_REJECT_REASONS: readonly LineRejectReason[] = ['unterminated_quote', 'stray_quote', 'line_too_long', 'wrong_field_count'];

export interface LineHandlers {
  /** A complete line (without its line end), with its 1-based line number. */
  line(text: string, line: number): void;
  /** A line longer than MAX_LINE_CHARS: its length in characters and its first REJECTED_LINE_HEAD_CHARS. */
  tooLong(line: number, lengthChars: number, head: string): void;
  /**
   * Optional: a complete line given as the text it lies in, from start to end (without its line end), instead of
   * a string of its own; when present it is called in place of line().
   */
  lineIn?(text: string, start: number, end: number, line: number): void;
}

/**
 * Cuts text fed in pieces into lines. Each line ends at its own LF, CRLF or lone CR (detected per line, so a
 * file mixing them reads like any other), a CR at the end of one piece pairs with an LF at the start of the
 * next, and the last line needs no line end. Work is linear in the text: the unfinished rest of a piece is
 * never scanned twice, and a line longer than MAX_LINE_CHARS is dropped as it streams past (tooLong), never
 * held whole. A byte-order mark at the very start is dropped.
 */
export class LineSplitter {
  private rest = '';
  private pendingCr = false;
  private skipping = false;
  private skippedChars = 0;
  private skippedHead = '';
  private started = false;
  private lineNumber = 0;

  constructor(private readonly handlers: LineHandlers) {}

  /** Lines completed so far (every line, comments and blank lines included). */
  get lines(): number {
    return this.lineNumber;
  }

  /** Characters of the unfinished last line held back (0 while an over-long line is being skipped). */
  get unfinishedChars(): number {
    return this.rest.length;
  }

  push(piece: string): void {
    if (piece.length === 0) return;
    let text = piece;
    let position = 0;
    if (!this.started) {
      this.started = true;
      if (text.charCodeAt(0) === 0xfeff) position = 1;
    }
    if (this.pendingCr) {
      this.pendingCr = false;
      if (text.charCodeAt(position) === 10) position += 1;
    }
    let scanFrom = position;
    if (this.rest.length > 0) {
      // The kept rest holds no line end: scan only the new piece. The line it starts is finished on its own, and
      // the piece's other lines are cut from the piece itself, which is never copied behind the rest.
      const firstLf = text.indexOf('\n', position);
      const firstCr = text.indexOf('\r', position);
      const end = firstLf < 0 ? firstCr : firstCr < 0 ? firstLf : Math.min(firstLf, firstCr);
      if (end < 0) {
        text = this.rest + text.slice(position);
        scanFrom = text.length;
        position = 0;
        this.rest = '';
      } else {
        const joined = this.rest + text.slice(position, end);
        this.rest = '';
        let next = end + 1;
        if (end === firstCr) {
          if (next === text.length) this.pendingCr = true;
          else if (text.charCodeAt(next) === 10) next += 1;
        }
        this.finishLine(joined, 0, joined.length);
        position = next;
        scanFrom = next;
      }
    }
    let lf = text.indexOf('\n', scanFrom);
    let cr = text.indexOf('\r', scanFrom);
    while (lf >= 0 || cr >= 0) {
      const end = lf < 0 ? cr : cr < 0 ? lf : Math.min(lf, cr);
      let next = end + 1;
      if (end === cr) {
        if (next === text.length) this.pendingCr = true;
        else if (text.charCodeAt(next) === 10) next += 1;
      }
      this.finishLine(text, position, end);
      position = next;
      if (lf >= 0 && lf < position) lf = text.indexOf('\n', position);
      if (cr >= 0 && cr < position) cr = text.indexOf('\r', position);
    }
    const restLength = text.length - position;
    if (restLength === 0) return;
    if (this.skipping) {
      this.skippedChars += restLength;
    } else if (restLength > MAX_LINE_CHARS) {
      this.skipping = true;
      this.skippedChars = restLength;
      this.skippedHead = text.slice(position, position + REJECTED_LINE_HEAD_CHARS);
    } else {
      this.rest = position === 0 ? text : text.slice(position);
    }
  }

  /** Ends the text: the last line, if it had no line end. */
  end(): void {
    if (this.skipping) {
      this.finishLine('', 0, 0);
    } else if (this.rest.length > 0) {
      const last = this.rest;
      this.rest = '';
      this.finishLine(last, 0, last.length);
    }
  }

  private finishLine(text: string, start: number, end: number): void {
    this.lineNumber += 1;
    if (this.skipping) {
      this.skipping = false;
      const length = this.skippedChars + (end - start);
      const head = this.skippedHead;
      this.skippedChars = 0;
      this.skippedHead = '';
      this.handlers.tooLong(this.lineNumber, length, head);
    } else if (end - start > MAX_LINE_CHARS) {
      this.handlers.tooLong(this.lineNumber, end - start, text.slice(start, start + REJECTED_LINE_HEAD_CHARS));
    } else if (this.handlers.lineIn !== undefined) {
      this.handlers.lineIn(text, start, end, this.lineNumber);
    } else {
      this.handlers.line(start === 0 && end === text.length ? text : text.slice(start, end), this.lineNumber);
    }
  }
}

/** Cuts a whole text into lines with LineSplitter's rules. */
export function splitLines(text: string, handlers: LineHandlers): number {
  const splitter = new LineSplitter(handlers);
  splitter.push(text);
  splitter.end();
  return splitter.lines;
}

/** A line is a comment when its first non-blank character is '#'; blank when it holds only white space. */
export function isCommentOrBlankLine(text: string): boolean {
  for (let index = 0; index < text.length; index += 1) {
    const code = text.charCodeAt(index);
    if (code === 32 || code === 9 || code === 0xfeff || code === 0xa0) continue;
    return code === 35; // '#'
  }
  return true;
}

export type SplitResult = { ok: true; fields: string[] } | { ok: false; reason: 'unterminated_quote' | 'stray_quote'; message: string };

/**
 * Splits one line into fields at the delimiter. A field may be quoted with `"` (a doubled `""` inside stands for
 * one quote; blanks around the quoted part are allowed); a quoted field must close on its own line, and a quote
 * may not stand inside an unquoted field or follow a closing quote with other text. Such a line gives
 * unterminated_quote or stray_quote, naming the column. With WHITESPACE_DELIMITER the line is cut at runs of spaces
 * and tabs (splitWhitespace), quotes taken as they stand. A line without quotes is split in one call
 * (mayHoldQuotes false: the caller knows the text around it holds no quote, so the line is not even searched).
 */
export function splitFields(text: string, delimiter: string, mayHoldQuotes = true): SplitResult {
  // Columns aligned with runs of blanks carry no quoting: a quote there is part of the value.
  if (delimiter === WHITESPACE_DELIMITER) return { ok: true, fields: splitWhitespace(text) };
  if (!mayHoldQuotes || text.indexOf('"') < 0) return { ok: true, fields: text.split(delimiter) };
  const fields: string[] = [];
  const length = text.length;
  const step = delimiter.length;
  let position = 0;
  for (;;) {
    const column = fields.length + 1;
    let start = position;
    while (start < length && isBlank(text.charCodeAt(start), delimiter)) start += 1;
    if (start < length && text.charCodeAt(start) === 34) {
      let value = '';
      let cursor = start + 1;
      for (;;) {
        const quote = text.indexOf('"', cursor);
        if (quote < 0) {
          return {
            ok: false,
            reason: 'unterminated_quote',
            message: `column ${column}: a quoted field opens but does not close on this line (a field may not run onto the next line); close the quote or remove it`,
          };
        }
        value += text.slice(cursor, quote);
        if (text.charCodeAt(quote + 1) === 34) {
          value += '"';
          cursor = quote + 2;
          continue;
        }
        cursor = quote + 1;
        break;
      }
      while (cursor < length && isBlank(text.charCodeAt(cursor), delimiter)) cursor += 1;
      fields.push(value);
      if (cursor >= length) return { ok: true, fields };
      if (!text.startsWith(delimiter, cursor)) {
        return { ok: false, reason: 'stray_quote', message: `column ${column}: text follows the closing quote ("${text.slice(cursor, cursor + 20)}…"); quote the whole field or remove the quotes` };
      }
      position = cursor + step;
      continue;
    }
    const next = text.indexOf(delimiter, position);
    const end = next < 0 ? length : next;
    const quote = text.indexOf('"', position);
    if (quote >= 0 && quote < end) {
      return { ok: false, reason: 'stray_quote', message: `column ${column}: a quote stands inside an unquoted field; quote the whole field (doubling inner quotes) or remove it` };
    }
    fields.push(text.slice(position, end));
    if (next < 0) return { ok: true, fields };
    position = next + step;
  }
}

function isBlank(code: number, delimiter: string): boolean {
  return (code === 32 || (code === 9 && delimiter !== '\t'));
}

/** Header names for a message: the first LISTED_HEADERS, quoted and cut to a readable length, then "… and N more". */
export function listHeaders(headers: readonly string[]): string {
  const shown = headers.slice(0, LISTED_HEADERS).map((header) => `"${header.length > LISTED_HEADER_CHARS ? `${header.slice(0, LISTED_HEADER_CHARS)}…` : header}"`);
  const more = headers.length - shown.length;
  return more > 0 ? `${shown.join(', ')} … and ${more} more` : shown.join(', ');
}

/**
 * The header line's fields, trimmed, or a LogFormatError: a quote problem, or a name used by two columns
 * (compared case-insensitively, as the mapping matches names), which would leave it open which column is read.
 */
export function readHeaderLine(text: string, delimiter: string, line: number): string[] {
  const split = splitFields(text, delimiter);
  if (!split.ok) {
    throw new LogFormatError(`Line ${line} (the header line) cannot be split into column names: ${split.message}.`, {
      line,
      hint: 'Column names are usually written without quotes; fix the header line and upload again.',
    });
  }
  const headers = split.fields.map((header) => header.trim());
  const firstColumn = new Map<string, number>();
  const repeated: string[] = [];
  headers.forEach((header, index) => {
    if (header === '') return;
    const key = header.toLowerCase();
    const first = firstColumn.get(key);
    if (first === undefined) firstColumn.set(key, index + 1);
    else repeated.push(`${listHeaders([header])} (columns ${first} and ${index + 1})`);
  });
  if (repeated.length > 0) {
    const named = repeated.slice(0, LISTED_HEADERS).join(', ') + (repeated.length > LISTED_HEADERS ? ` … and ${repeated.length - LISTED_HEADERS} more` : '');
    throw new LogFormatError(`Line ${line} (the header line) names the same column twice: ${named}. Calmcrest cannot tell which one holds the values.`, {
      line,
      hint: 'Rename or remove the repeated column so every column name is used once (names are compared without regard to case).',
    });
  }
  return headers;
}

/**
 * Refuses text that is not a UTF-8 log: UTF-16 (with or without byte-order mark; it shows as a NUL byte beside
 * nearly every character) gets its own message, other NUL bytes or many undecodable bytes mean a binary file.
 * `sample` is the decoded start of the file.
 */
export function rejectNonText(sample: string): void {
  const checked = sample.length > 65_536 ? sample.slice(0, 65_536) : sample;
  let evenNuls = 0;
  let oddNuls = 0;
  let suspicious = 0;
  let firstSuspicious = -1;
  for (let index = 0; index < checked.length; index += 1) {
    const code = checked.charCodeAt(index);
    if (code === 0) {
      if (index % 2 === 0) evenNuls += 1;
      else oddNuls += 1;
    }
    if (code === 0 || code === 0xfffd || (code < 32 && code !== 9 && code !== 10 && code !== 13)) {
      suspicious += 1;
      if (firstSuspicious < 0) firstSuspicious = index;
    }
  }
  // FF FE or FE FF decoded as UTF-8 are two replacement characters.
  const startsWithUtf16Mark = checked.startsWith('\uFFFD\uFFFD');
  const halfLength = checked.length / 2;
  const nulsOnOneSide = Math.max(evenNuls, oddNuls) > halfLength * 0.6 && Math.min(evenNuls, oddNuls) < halfLength * 0.05;
  if (nulsOnOneSide || (startsWithUtf16Mark && evenNuls + oddNuls > checked.length * 0.2)) {
    throw new LogFormatError('The file is UTF-16 text; Calmcrest reads UTF-8.', {
      line: 1,
      hint: 'Save it as UTF-8 (in a spreadsheet: "CSV UTF-8"; in a text editor: encoding UTF-8) and pick it again.',
    });
  }
  if (suspicious > 0 && (checked.includes('\u0000') || suspicious > checked.length / 100)) {
    const line = checked.slice(0, firstSuspicious).split(/\r\n|\n|\r/).length;
    throw new LogFormatError(`The file is not a text log: line ${line} holds binary data (${suspicious} unreadable characters in the first ${checked.length}).`, {
      line,
      hint: "Pick the monitor's exported text log (CSV, semicolon- or tab-separated), not an image, archive or spreadsheet file.",
    });
  }
}
