// Writes the hostile corpus: small files that each try one way of breaking the log reader, expected.json with
// the outcome each must have, and the table in README.md. Run: node_modules/.bin/tsx tests/hostile/generate.ts
// Large cases (long lines, huge headers, many rows) are not committed: the tests build them (see large.ts).
// Every number is invented.
import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { LARGE_CASES, type Expected } from './large.ts';

const here = dirname(fileURLToPath(import.meta.url));

interface Case {
  file: string;
  tries: string;
  content: string | Uint8Array;
  expected: Expected;
}

const HEADER = 'time_utc,seeing_arcsec,zenith_deg';
const time = (index: number): string => new Date(Date.UTC(2025, 2, 1, 0, index)).toISOString().replace('.000Z', 'Z');
const row = (index: number, seeing = (0.6 + (index % 20) * 0.02).toFixed(2), zenith = String(10 + (index % 30))): string => `${time(index)},${seeing},${zenith}`;
const rows = (count: number, from = 0): string[] => Array.from({ length: count }, (_, index) => row(from + index));
const lf = (lines: readonly string[]): string => `${lines.join('\n')}\n`;
const clean = (accepted: number): Expected => ({ status: 'done', accepted, rejectedByReason: {}, warned: false });
const done = (accepted: number, rejectedByReason: Record<string, number>, warned: boolean): Expected => ({ status: 'done', accepted, rejectedByReason, warned });
const refused = (message: string): Expected => ({ status: 400, message });

/** 20 good rows with `replace` put in at the given 0-based row indexes. */
function withRows(replace: Record<number, string>, count = 20, header = HEADER): string[] {
  return [header, ...rows(count).map((text, index) => replace[index] ?? text)];
}

function utf16(text: string, bigEndian: boolean, bom: boolean): Uint8Array {
  const bytes: number[] = bom ? (bigEndian ? [0xfe, 0xff] : [0xff, 0xfe]) : [];
  for (let index = 0; index < text.length; index += 1) {
    const code = text.charCodeAt(index);
    if (bigEndian) bytes.push(code >> 8, code & 0xff);
    else bytes.push(code & 0xff, code >> 8);
  }
  return Uint8Array.from(bytes);
}

function noise(length: number, seed: number): Uint8Array {
  const bytes = new Uint8Array(length);
  let state = seed >>> 0 || 1;
  for (let index = 0; index < length; index += 1) {
    // xorshift32: 32-bit integer arithmetic, so every byte value appears.
    state ^= state << 13;
    state ^= state >>> 17;
    state ^= state << 5;
    state >>>= 0;
    bytes[index] = state >>> 24;
  }
  return bytes;
}

const base = rows(20);
const cases: Case[] = [
  // Line ends
  { file: '01-lf-clean.csv', tries: 'a clean file with LF line ends (the reference)', content: lf([HEADER, ...base]), expected: clean(20) },
  { file: '02-crlf-clean.csv', tries: 'CRLF line ends', content: [HEADER, ...base].join('\r\n') + '\r\n', expected: clean(20) },
  { file: '03-lone-cr.csv', tries: 'lone CR line ends (old Mac style)', content: [HEADER, ...base].join('\r') + '\r', expected: clean(20) },
  { file: '04-crlf-header-lf-rows.csv', tries: 'a header ending in CRLF, rows ending in LF (once read as one row)', content: `${HEADER}\r\n${lf(base)}`, expected: clean(20) },
  { file: '05-lf-header-crlf-rows.csv', tries: 'a header ending in LF, rows ending in CRLF', content: `${HEADER}\n${base.join('\r\n')}\r\n`, expected: clean(20) },
  { file: '06-mixed-lf-crlf-rows.csv', tries: 'rows alternating LF and CRLF', content: `${HEADER}\n${base.map((text, index) => text + (index % 2 === 0 ? '\r\n' : '\n')).join('')}`, expected: clean(20) },
  { file: '07-mixed-lf-crlf-cr.csv', tries: 'LF, CRLF and lone CR in one file', content: `${HEADER}\r${base.map((text, index) => text + ['\n', '\r\n', '\r'][index % 3]).join('')}`, expected: clean(20) },
  { file: '08-no-final-newline.csv', tries: 'the last row without a line end', content: [HEADER, ...base].join('\n'), expected: clean(20) },
  { file: '09-crlf-no-final-newline.csv', tries: 'CRLF file whose last row has no line end', content: [HEADER, ...base].join('\r\n'), expected: clean(20) },
  { file: '10-utf8-bom.csv', tries: 'a UTF-8 byte-order mark before the header', content: `\uFEFF${lf([HEADER, ...base])}`, expected: clean(20) },
  { file: '11-utf8-bom-crlf.csv', tries: 'a byte-order mark and CRLF line ends', content: `\uFEFF${[HEADER, ...base].join('\r\n')}\r\n`, expected: clean(20) },
  { file: '12-blank-lines-everywhere.csv', tries: 'blank and white-space-only lines before the header, between rows and at the end', content: `\n  \n${HEADER}\n${base.join('\n\n')}\n\t\n\n`, expected: clean(20) },
  { file: '13-comments-everywhere.csv', tries: "'#' comments before the header, indented, between rows and at the end", content: lf(['# site: invented', '   # indented note', HEADER, ...base.slice(0, 10), '# pause', ...base.slice(10), '# end']), expected: clean(20) },
  // Quotes
  { file: '14-stray-quote-line-11.csv', tries: 'one opening quote on line 11 (once swallowed every later row)', content: lf(withRows({ 9: `${time(9)},"0.80,19` }, 40)), expected: done(39, { unterminated_quote: 1 }, true) },
  { file: '15-unterminated-quote-row-2.csv', tries: 'an unterminated quote on the first data row (line 2)', content: lf(withRows({ 0: `"${time(0)},0.60,10` }, 40)), expected: done(39, { unterminated_quote: 1 }, true) },
  { file: '16-semicolon-quote-then-text.csv', tries: '`"0.1"x` in a semicolon file: text after a closing quote', content: lf(withRows({ 1: `${time(1)};"0.1"x;11` }).map((text) => text.replaceAll(',', ';'))), expected: done(19, { stray_quote: 1 }, true) },
  { file: '17-quote-inside-unquoted-field.csv', tries: 'a quote in the middle of an unquoted number', content: lf(withRows({ 4: `${time(4)},0.6"8,14` })), expected: done(19, { stray_quote: 1 }, true) },
  { file: '18-embedded-newline-two-lines.csv', tries: 'a quoted field holding a line end (the record spans two lines)', content: lf(withRows({ 5: `${time(5)},"0.7\n0",15` })), expected: done(19, { unterminated_quote: 1, stray_quote: 1 }, true) },
  { file: '19-embedded-newline-three-lines.csv', tries: 'a quoted field spanning three lines', content: lf(withRows({ 5: `${time(5)},"0.7\nmore text\n0",15` })), expected: done(19, { unterminated_quote: 1, wrong_field_count: 1, stray_quote: 1 }, true) },
  { file: '20-every-field-quoted.csv', tries: 'every field and header quoted', content: lf([HEADER, ...base].map((text) => text.split(',').map((field) => `"${field}"`).join(','))), expected: clean(20) },
  { file: '21-doubled-quotes-in-note.csv', tries: 'an extra note column with doubled quotes inside a quoted field', content: lf([`${HEADER},note`, ...base.map((text, index) => `${text},"said ""ok"" at ${index}"`)]), expected: clean(20) },
  { file: '22-delimiter-inside-quotes.csv', tries: 'commas inside a quoted note column', content: lf([`${HEADER},note`, ...base.map((text) => `${text},"calm, clear, dry"`)]), expected: clean(20) },
  { file: '23-lone-quote-line.csv', tries: 'a line holding only a quote character', content: lf(withRows({ 7: '"' })), expected: done(19, { unterminated_quote: 1 }, true) },
  { file: '24-quoted-header.csv', tries: 'header names in quotes, rows unquoted', content: lf(['"time_utc","seeing_arcsec","zenith_deg"', ...base]), expected: clean(20) },
  { file: '25-unterminated-quote-in-header.csv', tries: 'an unterminated quote in the header line', content: lf(['time_utc,"seeing_arcsec,zenith_deg', ...base]), expected: refused('header line\\) cannot be split') },
  { file: '26-quote-storm.csv', tries: 'quotes scattered over many rows', content: lf(withRows({ 2: `${time(2)},0.6",12`, 6: `"${time(6)}",0.7,16`, 8: `${time(8)},"0.7""",18`, 12: `${time(12)},"",22`, 15: `${time(15)},0.9,"25`, 17: `${time(17)}"x,0.9,27` })), expected: done(15, { stray_quote: 2, missing_value: 2, unterminated_quote: 1 }, true) },
  // Field counts
  { file: '27-decimal-comma-in-comma-file.csv', tries: 'a decimal comma in a comma-separated file (shifts the columns)', content: lf(withRows({ 3: `${time(3)},0,85,13` })), expected: done(19, { wrong_field_count: 1 }, true) },
  { file: '28-short-row.csv', tries: 'a row with a column missing', content: lf(withRows({ 3: `${time(3)},0.85` })), expected: done(19, { wrong_field_count: 1 }, true) },
  { file: '29-trailing-delimiter.csv', tries: 'every row ending in a delimiter (an empty extra column)', content: lf([HEADER, ...base.map((text) => `${text},`)]), expected: clean(20) },
  { file: '30-extra-filled-field.csv', tries: 'a row with one value more than the header', content: lf(withRows({ 9: `${row(9)},42` })), expected: done(19, { wrong_field_count: 1 }, true) },
  { file: '31-truncated-last-line.csv', tries: 'a last line cut in the middle (power cut while writing)', content: `${lf([HEADER, ...base])}2025-03-01T00:2`, expected: done(20, { wrong_field_count: 1 }, true) },
  // Delimiters
  { file: '32-semicolon-decimal-comma.csv', tries: 'semicolons with decimal commas', content: lf([HEADER.replaceAll(',', ';'), ...base.map((text) => text.replaceAll(',', ';').replace('.', ','))]), expected: clean(20) },
  { file: '33-tab-separated.tsv', tries: 'tab-separated', content: lf([HEADER, ...base].map((text) => text.replaceAll(',', '\t'))), expected: clean(20) },
  { file: '34-tab-crlf.tsv', tries: 'tab-separated with CRLF', content: [HEADER, ...base].map((text) => text.replaceAll(',', '\t')).join('\r\n') + '\r\n', expected: clean(20) },
  // Headers
  { file: '35-duplicate-header.csv', tries: 'zenith_deg twice (holding 8 and 85)', content: lf([`${HEADER},zenith_deg`, ...base.map((text) => `${text.replace(/,[0-9]+$/, ',8')},85`)]), expected: refused('"zenith_deg" \\(columns 3 and 4\\)') },
  { file: '36-duplicate-header-case.csv', tries: 'the same name in two spellings of case', content: lf([`${HEADER},Zenith_Deg`, ...base.map((text) => `${text},85`)]), expected: refused('same column twice') },
  { file: '37-duplicate-header-spaces.csv', tries: 'the same name with surrounding spaces', content: lf([`${HEADER}, zenith_deg `, ...base.map((text) => `${text},85`)]), expected: refused('same column twice') },
  { file: '38-header-only.csv', tries: 'a header and no rows', content: lf([HEADER]), expected: done(0, {}, true) },
  { file: '39-empty.csv', tries: 'zero bytes', content: '', expected: refused('The file is empty') },
  { file: '40-comments-only.csv', tries: 'only comments and blank lines', content: lf(['# nothing', '', '# still nothing']), expected: refused('The file is empty') },
  { file: '41-no-time-column.csv', tries: 'no time column', content: lf(['seeing_arcsec,zenith_deg', '0.8,10']), expected: refused('No column holds time_utc') },
  // Numbers
  { file: '42-hex-seeing.csv', tries: 'hexadecimal 0x1A as the seeing (Number() reads 26)', content: lf(withRows({ 2: `${time(2)},0x1A,12` })), expected: done(19, { non_decimal_number: 1 }, false) },
  { file: '43-octal-binary.csv', tries: 'octal 0o17 and binary 0b1 values', content: lf(withRows({ 2: `${time(2)},0o17,12`, 3: `${time(3)},0.8,0b1` })), expected: done(18, { non_decimal_number: 2 }, false) },
  { file: '44-hex-zenith.csv', tries: 'a hexadecimal zenith angle with upper-case X', content: lf(withRows({ 5: `${time(5)},0.8,0X1F` })), expected: done(19, { non_decimal_number: 1 }, false) },
  { file: '45-infinity-nan-words.csv', tries: 'Infinity, -inf and NaN as values', content: lf(withRows({ 1: `${time(1)},Infinity,11`, 2: `${time(2)},-inf,12`, 3: `${time(3)},NaN,13` })), expected: done(17, { non_physical: 3 }, true) },
  { file: '46-overflow-1e400.csv', tries: 'a value beyond the number range', content: lf(withRows({ 4: `${time(4)},1e400,14` })), expected: done(19, { non_physical: 1 }, false) },
  {
    file: '47-variance-1e300.csv',
    tries: 'a variance of 1e300 arcsec² (gave a seeing of 2.3e180″)',
    content: lf(['time_utc,var_long_arcsec2,var_trans_arcsec2,zenith_deg', ...Array.from({ length: 20 }, (_, index) => `${time(index)},${index === 3 ? '1e300' : '0.07'},${index === 3 ? '1e300' : '0.05'},15`)]),
    expected: done(19, { implausible_seeing: 1 }, false),
  },
  {
    file: '67-exposure-correction-too-large.csv',
    tries: 'a 2τ variance at a tenth of the τ variance (asks for ×2.82)',
    content: lf([
      'time_utc,var_long_arcsec2,var_trans_arcsec2,var_long_2x_arcsec2,var_trans_2x_arcsec2,zenith_deg',
      ...Array.from({ length: 20 }, (_, index) => `${time(index)},0.07,0.05,${index === 4 ? '0.007,0.005' : '0.063,0.045'},15`),
    ]),
    expected: done(19, { exposure_correction_too_large: 1 }, false),
  },
  {
    file: '68-centroid-noise-dominated.csv',
    tries: 'centroid noise at over half of the measured variance',
    content: lf([
      'time_utc,var_long_arcsec2,var_trans_arcsec2,noise_long_arcsec2,noise_trans_arcsec2,zenith_deg',
      ...Array.from({ length: 20 }, (_, index) => `${time(index)},0.07,0.05,${index === 5 ? '0.02' : '0.001'},0.001,15`),
    ]),
    expected: done(19, { noise_dominated: 1 }, false),
  },
  { file: '48-seeing-outside-window.csv', tries: 'seeing 0.01″ and 50″ (a unit mistake)', content: lf(withRows({ 2: `${time(2)},0.01,12`, 3: `${time(3)},50,13` })), expected: done(18, { implausible_seeing: 2 }, false) },
  { file: '49-zero-negative-seeing.csv', tries: 'seeing 0 and −0.5', content: lf(withRows({ 2: `${time(2)},0,12`, 3: `${time(3)},-0.5,13` })), expected: done(18, { non_physical: 2 }, false) },
  { file: '50-empty-values.csv', tries: 'empty seeing and empty zenith angle', content: lf(withRows({ 2: `${time(2)},,12`, 3: `${time(3)},0.8,` })), expected: done(18, { missing_value: 2 }, false) },
  { file: '51-words-in-numbers.csv', tries: 'words and units inside number fields', content: lf(withRows({ 2: `${time(2)},fast,12`, 3: `${time(3)},0.8arcsec,13`, 4: `${time(4)},0_8,14` })), expected: done(17, { missing_value: 3 }, true) },
  { file: '52-zenith-out-of-range.csv', tries: 'zenith angles of 90° and −5°', content: lf(withRows({ 2: `${time(2)},0.8,90`, 3: `${time(3)},0.8,-5` })), expected: done(18, { non_physical: 2 }, false) },
  // Times
  { file: '53-year-0000.csv', tries: 'a sample in year 0000 (a reset clock)', content: lf(withRows({ 2: `0000-03-01T00:02:00Z,0.8,12` })), expected: done(19, { implausible_time: 1 }, false) },
  { file: '54-year-9999.csv', tries: 'a sample in year 9999', content: lf(withRows({ 2: `9999-03-01T00:02:00Z,0.8,12` })), expected: done(19, { implausible_time: 1 }, false) },
  { file: '55-year-1989-and-2099.csv', tries: 'samples in 1989 and 2099', content: lf(withRows({ 2: `1989-12-31T23:59:00Z,0.8,12`, 3: `2099-01-01T00:00:00Z,0.8,13` })), expected: done(18, { implausible_time: 2 }, false) },
  { file: '56-impossible-dates.csv', tries: '30 February and hour 25', content: lf(withRows({ 2: `2025-02-30T00:00:00Z,0.8,12`, 3: `2025-03-01T25:00:00Z,0.8,13` })), expected: done(18, { unreadable_time: 2 }, false) },
  { file: '57-duplicate-times.csv', tries: 'two rows repeating earlier times', content: lf(withRows({ 5: row(1), 9: row(2) })), expected: done(18, { duplicate_time: 2 }, false) },
  { file: '58-times-with-offsets.csv', tries: 'times with offsets, a space separator, no Z and fractions', content: lf([HEADER, '2025-03-01T02:00:00+02:00,0.8,10', '2025-03-01 00:01:00,0.8,10', '2025-03-01T00:02:00.500Z,0.8,10', '2025-03-01T01:03:00+0100,0.8,10']), expected: clean(4) },
  { file: '59-mostly-unusable.csv', tries: 'half the rows with an empty seeing (more than 10 % unusable)', content: lf([HEADER, ...base.map((text, index) => (index % 2 === 0 ? text.replace(/,[0-9.]+,/, ',,') : text))]), expected: done(10, { missing_value: 10 }, true) },
  // Encodings and binary
  { file: '60-utf16le-bom.csv', tries: 'UTF-16 little-endian with byte-order mark (a spreadsheet "Unicode text" export)', content: utf16(lf([HEADER, ...base]), false, true), expected: refused('UTF-16 text') },
  { file: '61-utf16be-bom.csv', tries: 'UTF-16 big-endian with byte-order mark', content: utf16(lf([HEADER, ...base]), true, true), expected: refused('UTF-16 text') },
  { file: '62-utf16le-no-bom.csv', tries: 'UTF-16 little-endian without byte-order mark', content: utf16(lf([HEADER, ...base]), false, false), expected: refused('UTF-16 text') },
  { file: '63-binary-noise.bin', tries: '4 KiB of random bytes', content: noise(4096, 8), expected: refused('not a text log') },
  { file: '64-nul-bytes-in-row.csv', tries: 'NUL bytes inside a row', content: lf(withRows({ 4: `${time(4)},0.8\u0000\u0000,14` })), expected: refused('not a text log') },
  { file: '65-latin1-byte-in-comment.csv', tries: 'one Latin-1 byte (not UTF-8) in a comment', content: Uint8Array.from([...Buffer.from('# observer Ren'), 0xe9, ...Buffer.from(`\n${lf([HEADER, ...base])}`)]), expected: clean(20) },
  { file: '66-control-characters.csv', tries: 'form feed and vertical tab inside one row', content: lf(withRows({ 6: `${time(6)},0.8\f,\u000b16` })), expected: clean(20) },
];

/** Data lines of a text by the README's rule, counted independently of the engine: see large.ts. */
const expectations: Record<string, Expected & { tries: string }> = {};
for (const entry of cases) {
  writeFileSync(join(here, entry.file), entry.content);
  expectations[entry.file] = { ...entry.expected, tries: entry.tries };
}
writeFileSync(join(here, 'expected.json'), `${JSON.stringify(expectations, null, 2)}\n`);

const describeOutcome = (expected: Expected): string[] =>
  expected.status === 400
    ? ['400', '–', `refused: /${expected.message}/`]
    : [
        expected.warned ? 'done, with warnings' : 'done',
        String(expected.accepted),
        Object.entries(expected.rejectedByReason)
          .map(([reason, count]) => `${reason} ${count}`)
          .join(', ') || 'none',
      ];
const table = [
  '| file | tries | status | accepted | rejected by reason |',
  '|---|---|---|---|---|',
  ...cases.map((entry) => `| \`${entry.file}\` | ${entry.tries.replaceAll('|', '\\|')} | ${describeOutcome(entry.expected).join(' | ')} |`),
  ...LARGE_CASES.map((entry) => `| \`${entry.name}\` (built by the test) | ${entry.tries} | ${describeOutcome(entry.expected).join(' | ')} |`),
].join('\n');
const readmePath = join(here, 'README.md');
const readme = readFileSync(readmePath, 'utf8');
const start = readme.indexOf('<!-- table -->');
const end = readme.indexOf('<!-- /table -->');
if (start < 0 || end < 0) throw new Error('README.md lacks the <!-- table --> markers');
writeFileSync(readmePath, `${readme.slice(0, start + '<!-- table -->'.length)}\n${table}\n${readme.slice(end)}`);
console.log(`wrote ${cases.length} files, expected.json and the README table (${cases.length + LARGE_CASES.length} cases)`);
