// Hostile cases too large to commit: built in memory by the tests. Shared by generate.ts (for the README table)
// and the tests that upload and analyse them.

/** The outcome a file must have: a finished ingest with these counts, or a 400 whose message matches. */
export type Expected =
  | { status: 'done'; accepted: number; rejectedByReason: Record<string, number>; warned: boolean }
  | { status: 400; message: string; maxMessageChars?: number };

export interface LargeCase {
  name: string;
  tries: string;
  build(): Buffer;
  expected: Expected;
}

/** The engine's line limit in characters (MAX_LINE_CHARS), restated here so the corpus checks it from outside. */
export const LINE_LIMIT_CHARS = 1_048_576;

const HEADER = 'time_utc,seeing_arcsec,zenith_deg';
const row = (index: number): string => `${new Date(Date.UTC(2025, 2, 1, 0, index)).toISOString().replace('.000Z', 'Z')},${(0.6 + (index % 20) * 0.02).toFixed(2)},${10 + (index % 30)}`;
const rows = (count: number, from = 0): string[] => Array.from({ length: count }, (_, index) => row(from + index));
const text = (lines: readonly string[]): Buffer => Buffer.from(`${lines.join('\n')}\n`);

export const LARGE_CASES: LargeCase[] = [
  {
    name: 'L1-comment-line-20mb.csv',
    tries: 'one 20 MB comment line between rows (took time growing with the square of its length)',
    build: () => text([HEADER, ...rows(10), `#${'c'.repeat(20 * 1024 * 1024)}`, ...rows(10, 10)]),
    expected: { status: 'done', accepted: 20, rejectedByReason: { line_too_long: 1 }, warned: true },
  },
  {
    name: 'L2-data-line-2mb.csv',
    tries: 'one data row 2 MB long',
    build: () => text([HEADER, ...rows(10), `${row(10)},${'9'.repeat(2 * 1024 * 1024)}`, ...rows(10, 11)]),
    expected: { status: 'done', accepted: 20, rejectedByReason: { line_too_long: 1 }, warned: true },
  },
  {
    name: 'L3-rows-100k-stray-quote-line-11.csv',
    tries: '100 000 rows with one opening quote on line 11',
    build: () => {
      const lines = [HEADER, ...rows(100_000)];
      lines[10] = (lines[10] ?? '').replace(',0.', ',"0.');
      return text(lines);
    },
    expected: { status: 'done', accepted: 99_999, rejectedByReason: { unterminated_quote: 1 }, warned: true },
  },
  {
    name: 'L4-header-100k-columns.csv',
    tries: 'a header of 100 000 columns, none of them a time (the error once listed them all: 66–99 kB)',
    build: () => text([Array.from({ length: 100_000 }, (_, index) => `c${index}`).join(','), Array.from({ length: 100_000 }, () => '1').join(',')]),
    expected: { status: 400, message: 'No column holds time_utc', maxMessageChars: 3000 },
  },
  {
    name: 'L5-header-over-1mib.csv',
    tries: 'a header line longer than the 1 MiB line limit',
    build: () => text([`${HEADER},${Array.from({ length: 200_000 }, (_, index) => `extra${index}`).join(',')}`, row(0)]),
    expected: { status: 400, message: 'header line\\) is [0-9]+ characters long', maxMessageChars: 3000 },
  },
];

/**
 * Data lines by the README's rule, counted without the engine: lines end at LF, CRLF or CR; the header is the
 * first line that is neither blank nor a '#' comment; after it every line that is neither blank nor a comment,
 * and every line longer than the line limit, is a data line.
 */
export function countDataLines(content: Buffer): number {
  const lines = content.toString('utf8').replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  if (lines.at(-1) === '') lines.pop();
  const isSkipped = (line: string): boolean => line.length <= LINE_LIMIT_CHARS && (line.trim() === '' || line.trim().startsWith('#'));
  const header = lines.findIndex((line) => !isSkipped(line));
  if (header < 0) return 0;
  return lines.slice(header + 1).filter((line) => !isSkipped(line)).length;
}
