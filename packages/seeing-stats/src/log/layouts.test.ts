import { createReadStream } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { LogFormatError } from '../errors.js';
import { streamLog } from '../node/streamLog.js';
import { createRowReader, type MonitorSettings } from './createRowReader.js';
import { delimiterOfChoice, parseDelimiterChoice, splitWhitespace, WHITESPACE_DELIMITER } from './delimiters.js';
import { detectDelimiter } from './detectDelimiter.js';
import { previewLog } from './previewLog.js';
import { proposeMapping } from './proposeMapping.js';
import { LogTextReader, type LogLayout } from './readLogText.js';
import { splitFields } from './splitLog.js';

const SEEING_MONITOR: MonitorSettings = { wavelengthNm: 500, response: 'z-tilt' };
const sample = (name: string) => fileURLToPath(new URL(`../../../../data-samples/${name}`, import.meta.url));

/** Streams a sample log and counts its rows by outcome, as the analyzer and the server do. */
async function countSample(name: string, options: Parameters<typeof streamLog>[1]) {
  const rejected: Record<string, number> = {};
  const lines: number[] = [];
  let accepted = 0;
  const result = await streamLog(createReadStream(sample(name)), options, {
    onSample: () => {
      accepted += 1;
    },
    onReject: (line, reason) => {
      rejected[reason] = (rejected[reason] ?? 0) + 1;
      lines.push(line);
    },
  });
  return { read: result.rowsRead, accepted, rejected, lines, preambleLines: result.preambleLines, delimiter: result.delimiter, linesTotal: result.linesTotal };
}

/** Reads a text through LogTextReader and lists what it saw. */
function readText(text: string, layout?: LogLayout) {
  const rows: { line: number; fields: string[] }[] = [];
  const bad: number[] = [];
  let headers: string[] = [];
  const reader = new LogTextReader(
    {
      header: (found) => {
        headers = found;
      },
      row: (fields, line) => rows.push({ line, fields }),
      badLine: (line) => bad.push(line),
    },
    layout,
  );
  reader.push(text);
  reader.end();
  return { headers, rows, bad, rowsRead: reader.rowsRead, preambleLines: reader.preambleLines, delimiter: reader.delimiter, lines: reader.lines };
}

describe('columns aligned with runs of spaces or tabs', () => {
  it('are split at every run of blanks, ignoring blanks at the ends of the line', () => {
    expect(splitWhitespace('  2025-06-12T23:00:00Z   0.79\t1.035  ')).toEqual(['2025-06-12T23:00:00Z', '0.79', '1.035']);
    expect(splitFields('a \t b   c', WHITESPACE_DELIMITER)).toEqual({ ok: true, fields: ['a', 'b', 'c'] });
  });

  it('are detected when no comma, semicolon or tab count is the same on every line', () => {
    expect(detectDelimiter('time_utc   seeing_arcsec  airmass\n2025-06-12T23:00:00Z  0.79   1.03\n2025-06-12T23:02:00Z\t0.81  1.04')).toBe(WHITESPACE_DELIMITER);
    // A consistent real delimiter still wins over the blanks inside a value.
    expect(detectDelimiter('Timestamp (UTC);FWHM [arcsec]\n2025-05-02 00:30:00;0,85')).toBe(';');
    expect(detectDelimiter('time_utc,seeing_arcsec\n2025-01-01T00:00:00Z,0.8')).toBe(',');
  });

  it('read the sample file to its documented counts: 80 read, 78 accepted, a short line and an airmass below 1', async () => {
    const counts = await countSample('format-whitespace.txt', { monitor: SEEING_MONITOR });
    expect(counts).toMatchObject({ read: 80, accepted: 78, rejected: { wrong_field_count: 1, non_physical: 1 }, lines: [32, 57], delimiter: WHITESPACE_DELIMITER, preambleLines: 0 });
  });
});

describe('a delimiter a person chooses', () => {
  it('is read from the words people type, and a wrong one names the choices', () => {
    expect(parseDelimiterChoice(';')).toBe(';');
    expect(parseDelimiterChoice('comma')).toBe(',');
    expect(delimiterOfChoice(parseDelimiterChoice('TAB'))).toBe('\t');
    expect(delimiterOfChoice('space')).toBe(' ');
    expect(() => parseDelimiterChoice('|')).toThrow(/must be one of ',', ';', tab, space or whitespace .*got "\|"/);
  });

  it('overrides the detection where commas and semicolons tie, and says which delimiter was used when the header cannot be read', async () => {
    await expect(countSample('format-delimiter.csv', { monitor: SEEING_MONITOR })).rejects.toThrow(LogFormatError);
    await expect(countSample('format-delimiter.csv', { monitor: SEEING_MONITOR })).rejects.toMatchObject({ hint: expect.stringMatching(/split at comma \(detected\).*give the delimiter/) });
    const counts = await countSample('format-delimiter.csv', { monitor: SEEING_MONITOR, delimiter: ';' });
    // Decimal commas are read in a semicolon file: 50 read, 49 accepted, the negative seeing on line 30.
    expect(counts).toMatchObject({ read: 50, accepted: 49, rejected: { non_physical: 1 }, lines: [30], delimiter: ';' });
  });

  it('splits at each single space when "space" is chosen, so two spaces make an empty field', () => {
    const read = readText('a b c\n1 2 3\n1  3\n', { delimiter: ' ' });
    expect(read.headers).toEqual(['a', 'b', 'c']);
    expect(read.rows.map((row) => row.fields)).toEqual([
      ['1', '2', '3'],
      ['1', '', '3'],
    ]);
  });
});

describe('the header on line N below a plain-text preamble', () => {
  const text = 'Export of mast B\nOperator: night crew\n\ntime_utc,seeing_arcsec,zenith_deg\n# a comment\n2025-06-12T23:00:00Z,0.8,20\n2025-06-12T23:02:00Z,0.9,21\n';

  it('skips the lines above it as preamble and still counts every data line as a row', () => {
    const read = readText(text, { headerLine: 4 });
    expect(read.headers).toEqual(['time_utc', 'seeing_arcsec', 'zenith_deg']);
    expect(read).toMatchObject({ preambleLines: 3, rowsRead: 2, delimiter: ',', lines: 7 });
    expect(read.rows.map((row) => row.line)).toEqual([6, 7]);
    // lines = preamble + header + comment + rows.
    expect(read.lines).toBe(read.preambleLines + 1 + 1 + read.rowsRead);
  });

  it('guesses the delimiter from the columns, not from the preamble', () => {
    expect(readText('Export; mast B; night crew\ntime_utc,seeing_arcsec,zenith_deg\n2025-06-12T23:00:00Z,0.8,20\n', { headerLine: 2 }).delimiter).toBe(',');
  });

  it('refuses a header line that is blank, a comment, or beyond the end of the file, saying which line and what to give', () => {
    expect(() => readText(text, { headerLine: 3 })).toThrow(/Line 3, set as the header line, is blank: it does not name the columns/);
    expect(() => readText(text, { headerLine: 5 })).toThrow(/Line 5, set as the header line, is a # comment/);
    expect(() => readText(text, { headerLine: 40 })).toThrow(/The header line was set to line 40, but the file has only 7 lines/);
  });

  it('reads the sample file to its documented counts: 5 preamble lines, 60 read, 59 accepted, the 95° zenith angle on line 40', async () => {
    const counts = await countSample('format-preamble.txt', { monitor: SEEING_MONITOR, headerLine: 6 });
    expect(counts).toMatchObject({ read: 60, accepted: 59, rejected: { non_physical: 1 }, lines: [40], preambleLines: 5, linesTotal: 66 });
    // Without the header line the first preamble line is taken for the header, and the message says what to give.
    await expect(countSample('format-preamble.txt', { monitor: SEEING_MONITOR })).rejects.toMatchObject({ hint: expect.stringMatching(/--header-line N/) });
  });

  it('is shown by the preview with the preamble counted', () => {
    const preview = previewLog(text, { monitor: SEEING_MONITOR, headerLine: 4 });
    expect(preview).toMatchObject({ preambleLines: 3, headers: ['time_utc', 'seeing_arcsec', 'zenith_deg'], mappingProblems: [] });
    expect(preview.rows.map((row) => row.line)).toEqual([6, 7]);
  });
});

describe('date and time of day in two columns', () => {
  it('are proposed as date_utc and time_utc from their names; a lone Date column is the time column', () => {
    expect(proposeMapping(['Date', 'Time', 'Seeing', 'Zenith'])).toEqual({ date_utc: 'Date', time_utc: 'Time', seeing_arcsec: 'Seeing', zenith_deg: 'Zenith' });
    expect(proposeMapping(['Date', 'Seeing', 'Zenith'])).toEqual({ time_utc: 'Date', seeing_arcsec: 'Seeing', zenith_deg: 'Zenith' });
  });

  it('are read as one stamp "date time", in every time format that writes a calendar date', () => {
    const headers = ['d', 't', 'seeing_arcsec', 'zenith_deg'];
    const iso = createRowReader({ headers, mapping: { date_utc: 'd', time_utc: 't', seeing_arcsec: 'seeing_arcsec', zenith_deg: 'zenith_deg' }, monitor: SEEING_MONITOR });
    const read = iso(['2025-06-12', '23:15:00', '0.8', '0'], 2);
    expect(read.ok && read.sample.timeMs).toBe(Date.UTC(2025, 5, 12, 23, 15));
    const dmy = createRowReader({ headers, mapping: { date_utc: 'd', time_utc: 't', seeing_arcsec: 'seeing_arcsec', zenith_deg: 'zenith_deg' }, monitor: SEEING_MONITOR, timeFormat: 'dmy', utcOffsetMinutes: 120 });
    const local = dmy(['13/06/2025', '01:15', '0.8', '0'], 2);
    expect(local.ok && local.sample.timeMs).toBe(Date.UTC(2025, 5, 12, 23, 15));
    const bad = iso(['2025-06-12', '', '0.8', '0'], 3);
    expect(bad).toMatchObject({ ok: false, reason: 'unreadable_time' });
  });

  it('refuse a date column beside Julian dates, which hold the date already', () => {
    expect(() =>
      createRowReader({ headers: ['d', 'jd', 'seeing_arcsec', 'zenith_deg'], mapping: { date_utc: 'd', time_utc: 'jd', seeing_arcsec: 'seeing_arcsec', zenith_deg: 'zenith_deg' }, monitor: SEEING_MONITOR, timeFormat: 'jd' }),
    ).toThrow(/The date column "d" cannot be combined with Julian dates/);
  });

  it('read the sample file to its documented counts: 90 read, 88 accepted, hour 24 on line 20 and an empty seeing on line 60', async () => {
    const counts = await countSample('format-two-columns.csv', { monitor: SEEING_MONITOR, mapping: { date_utc: 'Date', time_utc: 'Time' } });
    expect(counts).toMatchObject({ read: 90, accepted: 88, rejected: { unreadable_time: 1, missing_value: 1 }, lines: [20, 60] });
  });
});
