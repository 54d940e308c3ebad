import { describe, expect, it } from 'vitest';
import { LogFormatError } from '../errors.js';
import { createRowReader, type MonitorSettings, type RowResult } from './createRowReader.js';
import { previewLog } from './previewLog.js';
import { proposeMapping } from './proposeMapping.js';
import { LogTextReader } from './readLogText.js';
import { listHeaders, MAX_LINE_CHARS, readHeaderLine, rejectNonText, splitFields, splitLines, LineSplitter } from './splitLog.js';

const monitor: MonitorSettings = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: 'z-tilt' };

function linesOf(text: string, pieceChars = text.length): string[] {
  const lines: string[] = [];
  const splitter = new LineSplitter({ line: (line) => lines.push(line), tooLong: (line, length) => lines.push(`<too long ${line}: ${length}>`) });
  for (let start = 0; start < text.length; start += pieceChars) splitter.push(text.slice(start, start + pieceChars));
  splitter.end();
  return lines;
}

/** Reads a whole text like streamLog does and lists what became of each data line. */
function readText(text: string, pieceChars = 64 * 1024): { headers: string[] | null; rows: string[]; bad: string[]; rowsRead: number } {
  const rows: string[] = [];
  const bad: string[] = [];
  const reader = new LogTextReader({ header() {}, row: (fields, line) => rows.push(`${line}:${fields.join('|')}`), badLine: (line, reason) => bad.push(`${line}:${reason}`) });
  for (let start = 0; start < text.length; start += pieceChars) reader.push(text.slice(start, start + pieceChars));
  reader.end();
  return { headers: reader.headers, rows, bad, rowsRead: reader.rowsRead };
}

describe('line ends', () => {
  it('ends each line at its own LF, CRLF or lone CR, so mixed files read like any other', () => {
    expect(linesOf('a\nb\r\nc\rd')).toEqual(['a', 'b', 'c', 'd']);
    expect(linesOf('h\r\n1\n2\n')).toEqual(['h', '1', '2']);
    expect(linesOf('h\r1\r2\r')).toEqual(['h', '1', '2']);
    expect(linesOf('a\r\n\r\nb')).toEqual(['a', '', 'b']);
  });
  it('gives the same lines whatever the pieces the text arrives in, a CRLF cut between two pieces included', () => {
    const text = '\uFEFFh1,h2\r\n1,2\n3,4\r5,6\r\n\r\n7,8';
    const whole = linesOf(text);
    expect(whole).toEqual(['h1,h2', '1,2', '3,4', '5,6', '', '7,8']);
    for (const piece of [1, 2, 3, 5, 7]) expect(linesOf(text, piece), `pieces of ${piece}`).toEqual(whole);
  });
  it('gives the same lines in place (lineIn: text, start, end) as strings of their own, whatever the pieces', () => {
    const text = 'h1,h2\r\n1,2\n3,4\r5,6\r\n\r\n7,8\n' + 'x,y\n'.repeat(20) + 'last';
    for (const piece of [1, 2, 3, 5, 7, 64, text.length]) {
      const inPlace: string[] = [];
      const splitter = new LineSplitter({ line: () => inPlace.push('<line() called>'), tooLong() {}, lineIn: (piece, start, end) => inPlace.push(piece.slice(start, end)) });
      for (let start = 0; start < text.length; start += piece) splitter.push(text.slice(start, start + piece));
      splitter.end();
      expect(inPlace, `pieces of ${piece}`).toEqual(linesOf(text));
    }
  });
  it('counts every line, the last one without a line end included', () => {
    expect(splitLines('a\nb\n', { line() {}, tooLong() {} })).toBe(2);
    expect(splitLines('a\nb', { line() {}, tooLong() {} })).toBe(2);
  });
});

describe('lines over the limit', () => {
  it('rejects a line longer than MAX_LINE_CHARS without holding it, and reads the next line', () => {
    const long = 'x'.repeat(MAX_LINE_CHARS + 10);
    expect(linesOf(`a\n${long}\nb`, 4096)).toEqual(['a', `<too long 2: ${MAX_LINE_CHARS + 10}>`, 'b']);
    expect(linesOf(`a\n${long}`, 4096)).toEqual(['a', `<too long 2: ${MAX_LINE_CHARS + 10}>`]);
    expect(linesOf(`a\n${'y'.repeat(MAX_LINE_CHARS)}\nb`, 4096)[1]).toHaveLength(MAX_LINE_CHARS);
  });
  it('reads a 40 MB comment line in time linear in its length (a quadratic reader took seconds per few MB)', () => {
    const piece = `#${'c'.repeat(64 * 1024 - 1)}`;
    const reader = new LogTextReader({ header() {}, row() {}, badLine() {} });
    const startedMs = performance.now();
    reader.push('time_utc,seeing_arcsec,zenith_deg\n');
    for (let index = 0; index < 640; index += 1) reader.push(index === 0 ? piece : piece.replace('#', 'c'));
    reader.push('\n2025-03-01T00:00:00Z,0.8,10\n');
    reader.end();
    const elapsedMs = performance.now() - startedMs;
    expect(reader.rowsRead).toBe(2);
    expect(elapsedMs).toBeLessThan(2000);
  });
});

describe('fields', () => {
  it('splits quoted fields, doubled quotes and blanks around quotes like RFC 4180', () => {
    expect(splitFields('a,"b,c","d ""e""", "f" ,', ',')).toEqual({ ok: true, fields: ['a', 'b,c', 'd "e"', 'f', ''] });
    expect(splitFields('1;2;3', ';')).toEqual({ ok: true, fields: ['1', '2', '3'] });
  });
  it('rejects a quote that does not close on its line, a quote inside an unquoted field and text after a closing quote', () => {
    expect(splitFields('2025-03-01T00:00:00Z,"0.8,10', ',')).toMatchObject({ ok: false, reason: 'unterminated_quote' });
    expect(splitFields('2025-03-01T00:00:00Z,0.8",10', ',')).toMatchObject({ ok: false, reason: 'stray_quote' });
    expect(splitFields('2025-03-01T00:00:00Z;"0.1"x;10', ';')).toMatchObject({ ok: false, reason: 'stray_quote' });
  });
});

describe('rows read equal data lines', () => {
  const header = 'time_utc,seeing_arcsec,zenith_deg';
  const row = (minute: number): string => `2025-03-01T00:${String(minute).padStart(2, '0')}:00Z,0.8,10`;
  it('reads one stray quote as one bad line and every other line as its row', () => {
    const lines = [header, ...Array.from({ length: 40 }, (_, index) => row(index))];
    lines[10] = lines[10]?.replace(',0.8', ',"0.8') ?? '';
    const read = readText(`${lines.join('\n')}\n`, 100);
    expect(read.rowsRead).toBe(40);
    expect(read.bad).toEqual(['11:unterminated_quote']);
    expect(read.rows).toHaveLength(39);
  });
  it('judges each line of a quoted field with an embedded newline on its own', () => {
    const read = readText([header, row(0), '2025-03-01T00:01:00Z,"0.8', '5",10', row(2)].join('\n'));
    expect(read.rowsRead).toBe(4);
    expect(read.bad).toEqual(['3:unterminated_quote', '4:stray_quote']);
    expect(read.rows.map((text) => text.split(':')[0])).toEqual(['2', '5']);
  });
  it('reads a CRLF header with LF rows, lone-CR files and mixed files row by row', () => {
    const rows = [row(0), row(1), row(2)];
    for (const text of [`${header}\r\n${rows.join('\n')}\n`, `${[header, ...rows].join('\r')}\r`, `${header}\n${rows[0]}\r\n${rows[1]}\n${rows[2]}\r\n`]) {
      const read = readText(text);
      expect(read.rowsRead, JSON.stringify(text)).toBe(3);
      expect(read.rows).toHaveLength(3);
    }
  });
  it('skips comments and blank lines, and rejects a line whose field count does not match the header', () => {
    const read = readText([`# note`, header, '', row(0), '  # later note', '2025-03-01T00:01:00Z,0,8,10', '2025-03-01T00:02:00Z,0.8', `${row(3)},`, '\t'].join('\n'));
    expect(read.rowsRead).toBe(4);
    expect(read.bad).toEqual(['6:wrong_field_count', '7:wrong_field_count']);
    expect(read.rows.map((text) => text.split(':')[0])).toEqual(['4', '8']);
  });
});

describe('headers', () => {
  it('refuses a header naming a column twice, naming both columns', () => {
    expect(() => readHeaderLine('time_utc,seeing_arcsec,zenith_deg,Zenith_deg', ',', 3)).toThrow(/"Zenith_deg" \(columns 3 and 4\)/);
    expect(() => previewLog('time_utc,seeing_arcsec,zenith_deg,zenith_deg\n2025-03-01T00:00:00Z,0.8,8,85\n', { monitor })).toThrow(LogFormatError);
  });
  it('caps a header listing at 20 names and cuts long names', () => {
    const headers = Array.from({ length: 1_000_000 }, (_, index) => `c${index}`);
    const listed = listHeaders(headers);
    expect(listed).toMatch(/"c19" … and 999980 more$/);
    expect(listed.length).toBeLessThan(400);
    expect(listHeaders(['x'.repeat(5000)]).length).toBeLessThan(80);
  });
});

describe('encodings', () => {
  const text = 'time_utc,seeing_arcsec,zenith_deg\n2025-03-01T00:00:00Z,0.8,10\n';
  it('names UTF-16 text, with or without byte-order mark, instead of calling it binary', () => {
    const decode = (bytes: Uint8Array): string => new TextDecoder('utf-8').decode(bytes);
    const littleEndian = new Uint8Array(text.length * 2);
    for (let index = 0; index < text.length; index += 1) littleEndian[index * 2] = text.charCodeAt(index);
    const bigEndian = new Uint8Array([0xfe, 0xff, ...Array.from(littleEndian, (_, index) => littleEndian[index % 2 === 0 ? index + 1 : index - 1] ?? 0)]);
    for (const bytes of [littleEndian, new Uint8Array([0xff, 0xfe, ...littleEndian]), bigEndian]) {
      expect(() => rejectNonText(decode(bytes))).toThrow(/UTF-16 text/);
    }
    expect(() => rejectNonText(text)).not.toThrow();
    expect(() => rejectNonText(`${text}\u0000\u0007\u0001`)).toThrow(/not a text log/);
  });
});

describe('numbers and plausibility', () => {
  const headers = ['time_utc', 'seeing_arcsec', 'zenith_deg'];
  const reader = createRowReader({ headers, mapping: proposeMapping(headers), monitor, plausibility: { latestTimeMs: Date.UTC(2026, 0, 1) } });
  const reasonOf = (result: RowResult): string => (result.ok ? 'ok' : result.reason);
  it('rejects hexadecimal, octal and binary notation that Number() would read', () => {
    for (const text of ['0x1A', '0o17', '0b101', ' 0X1a', '0B1']) expect(reasonOf(reader(['2025-03-01T00:00:00Z', text, '10'], 2)), text).toBe('non_decimal_number');
    expect(reasonOf(reader(['2025-03-01T00:00:00Z', '10', '0x1A'], 2))).toBe('non_decimal_number');
    for (const text of ['0.8', '.8', '8e-1', '+0.8', '0.80 ', '08']) expect(reasonOf(reader(['2025-03-01T00:00:00Z', text, '10'], 2)), text).toBe('ok');
    expect(reasonOf(reader(['2025-03-01T00:00:00Z', 'Infinity', '10'], 2))).toBe('non_physical');
  });
  it('rejects seeing outside the 0.05″–10″ window and times outside 1990 to the latest plausible time', () => {
    expect(reasonOf(reader(['2025-03-01T00:00:00Z', '10.5', '0'], 2))).toBe('implausible_seeing');
    expect(reasonOf(reader(['2025-03-01T00:00:00Z', '0.04', '0'], 2))).toBe('implausible_seeing');
    expect(reasonOf(reader(['2025-03-01T00:00:00Z', '10', '0'], 2))).toBe('ok');
    expect(reasonOf(reader(['0000-03-01T00:00:00Z', '0.8', '0'], 2))).toBe('implausible_time');
    expect(reasonOf(reader(['9999-03-01T00:00:00Z', '0.8', '0'], 2))).toBe('implausible_time');
    expect(reasonOf(reader(['1989-12-31T23:59:59Z', '0.8', '0'], 2))).toBe('implausible_time');
    expect(reasonOf(reader(['1990-01-01T00:00:00Z', '0.8', '0'], 2))).toBe('ok');
    expect(reasonOf(reader(['2026-01-01T00:00:01Z', '0.8', '0'], 2))).toBe('implausible_time');
  });
  it('reads a 1e300 variance as implausible seeing, not as 2.3e180″', () => {
    const varianceHeaders = ['time_utc', 'var_long_arcsec2', 'var_trans_arcsec2', 'zenith_deg'];
    const varianceReader = createRowReader({ headers: varianceHeaders, mapping: proposeMapping(varianceHeaders), monitor });
    const result = varianceReader(['2025-03-01T00:00:00Z', '1e300', '1e300', '10'], 2);
    expect(reasonOf(result)).toBe('implausible_seeing');
    expect(reasonOf(varianceReader(['2025-03-01T00:00:00Z', '1e400', '0.1', '10'], 2))).toBe('non_physical');
  });
  it('lets the window be set, and refuses an upside-down one', () => {
    const wide = createRowReader({ headers, mapping: proposeMapping(headers), monitor, plausibility: { maxSeeingArcsec: 20 } });
    expect(reasonOf(wide(['2025-03-01T00:00:00Z', '15', '0'], 2))).toBe('ok');
    expect(() => createRowReader({ headers, mapping: proposeMapping(headers), monitor, plausibility: { minSeeingArcsec: 5, maxSeeingArcsec: 1 } })).toThrow(/above minSeeingArcsec/);
  });
});
