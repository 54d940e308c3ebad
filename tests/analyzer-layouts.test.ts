// The analyzer's layout flags on their sample logs (counts documented in data-samples/README.md).
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot } from './support/browser.ts';

interface Report {
  samples: { read: number; accepted: number; rejected: number; rejectedByReason: Record<string, number>; firstTimeUtc: string; lastTimeUtc: string };
  rejectedRows: { line: number; reason: string; message: string }[];
  file: { delimiter: string; preambleLines: number; linesTotal: number; mapping: Record<string, string> };
}

function analyze(...args: string[]): { status: number | null; report: Report | null; stderr: string; text: string } {
  const json = spawnSync(join(repoRoot, 'node_modules/.bin/tsx'), [join(repoRoot, 'apps/analyzer/src/main.ts'), ...args, '--json'], { cwd: repoRoot, encoding: 'utf8' });
  const text = spawnSync(join(repoRoot, 'node_modules/.bin/tsx'), [join(repoRoot, 'apps/analyzer/src/main.ts'), ...args], { cwd: repoRoot, encoding: 'utf8' });
  return { status: json.status, report: json.stdout ? (JSON.parse(json.stdout) as Report) : null, stderr: json.stderr, text: text.stdout };
}

const sample = (name: string): string => join(repoRoot, 'data-samples', name);

describe('analyzer layouts', () => {
  it('combines --date-column and --time-column: 90 rows, 88 accepted, hour 24 on line 20 and an empty seeing on line 60', () => {
    const run = analyze(sample('format-two-columns.csv'), '--date-column', 'Date', '--time-column', 'Time');
    expect(run.status, run.stderr).toBe(0);
    expect(run.report?.samples).toMatchObject({ read: 90, accepted: 88, rejected: 2, rejectedByReason: { unreadable_time: 1, missing_value: 1 } });
    expect(run.report?.file.mapping).toMatchObject({ date_utc: 'Date', time_utc: 'Time' });
    // Date 2025-06-12 and Time 23:00:00 on the first row (data-samples/generate.ts), 2-minute cadence across midnight.
    expect(run.report?.samples.firstTimeUtc).toBe('2025-06-12T23:00:00.000Z');
    expect(run.report?.samples.lastTimeUtc).toBe('2025-06-13T01:58:00.000Z');
    expect(run.report?.rejectedRows.map((row) => [row.line, row.reason])).toEqual([
      [20, 'unreadable_time'],
      [60, 'missing_value'],
    ]);
  });

  it('reads columns aligned with runs of blanks, detected or named with --delimiter whitespace: 80 rows, 78 accepted (exit 3 for the short line)', () => {
    for (const flags of [[], ['--delimiter', 'whitespace']]) {
      const run = analyze(sample('format-whitespace.txt'), ...flags);
      expect(run.status, run.stderr).toBe(3);
      expect(run.report?.samples).toMatchObject({ read: 80, accepted: 78, rejectedByReason: { wrong_field_count: 1, non_physical: 1 } });
      expect(run.report?.file.delimiter).toBe('whitespace');
      expect(run.report?.rejectedRows.map((row) => row.line)).toEqual([32, 57]);
    }
  });

  it("needs --delimiter ';' where commas and semicolons tie, and without it names the delimiter used and the flag (exit 2)", () => {
    const wrong = analyze(sample('format-delimiter.csv'));
    expect(wrong.status).toBe(2);
    expect(wrong.stderr).toMatch(/The columns were split at comma \(detected\): if the names above are cut at the wrong character, give the delimiter \(--delimiter\)/);
    const run = analyze(sample('format-delimiter.csv'), '--delimiter', ';');
    expect(run.status, run.stderr).toBe(0);
    expect(run.report?.samples).toMatchObject({ read: 50, accepted: 49, rejectedByReason: { non_physical: 1 } });
    expect(run.report?.rejectedRows.map((row) => row.line)).toEqual([30]);
  });

  it('skips the preamble above --header-line 6 and says so: 5 preamble lines, 60 rows, 59 accepted', () => {
    const run = analyze(sample('format-preamble.txt'), '--header-line', '6');
    expect(run.status, run.stderr).toBe(0);
    expect(run.report?.samples).toMatchObject({ read: 60, accepted: 59, rejectedByReason: { non_physical: 1 } });
    expect(run.report?.file).toMatchObject({ preambleLines: 5, linesTotal: 66 });
    expect(run.text).toContain('Preamble: lines 1–5 above the header line 6 skipped (not rows)');
    const without = analyze(sample('format-preamble.txt'));
    expect(without.status).toBe(2);
    expect(without.stderr).toMatch(/give that line \(--header-line N\)/);
  });

  it('refuses a bad layout flag with what to write instead (exit 2)', () => {
    const cases: [string[], RegExp][] = [
      [['--delimiter', '|'], /--delimiter: the delimiter must be one of ',', ';', tab, space or whitespace/],
      [['--header-line', '0'], /--header-line needs the number of the line holding the column names, a whole number from 1/],
      [['--header-line', '2.5'], /--header-line needs .* got "2.5"/],
      [['--date-column', 'Date'], /--date-column Date needs --time-column/],
      [['--header-line', '99'], /The header line was set to line 99, but the file has only 66 lines/],
    ];
    for (const [flags, message] of cases) {
      const run = analyze(sample('format-preamble.txt'), ...flags);
      expect(run.status, flags.join(' ')).toBe(2);
      expect(run.stderr).toMatch(message);
    }
  });
});
