// The command-line analyzer on files of the hostile corpus (tests/hostile/): exit codes, warnings, flags.
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot } from './support/browser.ts';

function analyze(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(join(repoRoot, 'node_modules/.bin/tsx'), [join(repoRoot, 'apps/analyzer/src/main.ts'), ...args], { cwd: repoRoot, encoding: 'utf8' });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}
const hostile = (name: string): string => join(repoRoot, 'tests', 'hostile', name);

describe('analyzer on hostile files', () => {
  it('exits 0 with no warnings for a clean file with mixed line ends', () => {
    const run = analyze(hostile('07-mixed-lf-crlf-cr.csv'), '--json');
    expect(run.status, run.stderr).toBe(0);
    const report = JSON.parse(run.stdout) as { samples: { read: number; accepted: number }; warnings: { code: string }[] };
    expect(report.samples).toMatchObject({ read: 20, accepted: 20 });
    expect(report.warnings.map((warning) => warning.code)).not.toContain('lines_not_split');
  });
  it('exits 3 and names the damaged line for a stray quote, in JSON, on stderr and in the readable report', () => {
    const json = analyze(hostile('14-stray-quote-line-11.csv'), '--json');
    expect(json.status).toBe(3);
    const report = JSON.parse(json.stdout) as { samples: { read: number; accepted: number; rejectedByReason: Record<string, number> }; warnings: { code: string }[]; rejectedRows: { line: number; reason: string }[] };
    expect(report.samples).toMatchObject({ read: 40, accepted: 39, rejectedByReason: { unterminated_quote: 1 } });
    expect(report.rejectedRows).toEqual([expect.objectContaining({ line: 11, reason: 'unterminated_quote' })]);
    expect(report.warnings[0]?.code).toBe('lines_not_split');
    expect(json.stderr).toMatch(/warning \(lines_not_split\): 1 line could not be split into fields \(unterminated_quote 1\)/);
    const readable = analyze(hostile('14-stray-quote-line-11.csv'));
    expect(readable.status).toBe(3);
    expect(readable.stdout).toMatch(/WARNING \(lines_not_split\): 1 line could not be split/);
    expect(readable.stdout).toMatch(/line\s+11\s+unterminated_quote/);
  });
  it('exits 2 naming a repeated header, and UTF-16 text as such', () => {
    const repeated = analyze(hostile('35-duplicate-header.csv'));
    expect(repeated.status).toBe(2);
    expect(repeated.stderr).toMatch(/"zenith_deg" \(columns 3 and 4\)/);
    const wide = analyze(hostile('60-utf16le-bom.csv'));
    expect(wide.status).toBe(2);
    expect(wide.stderr).toMatch(/UTF-16 text/);
    expect(wide.stderr).toMatch(/Save it as UTF-8/);
  });
  it('exits 1 for a header without rows', () => {
    const run = analyze(hostile('38-header-only.csv'), '--json');
    expect(run.status).toBe(1);
    expect((JSON.parse(run.stdout) as { warnings: { code: string; message: string }[] }).warnings[0]).toEqual({ code: 'no_data_rows', message: 'The file has a header line but no data rows.' });
  });
  it('takes the plausibility window from its flags and reports it', () => {
    const standard = JSON.parse(analyze(hostile('48-seeing-outside-window.csv'), '--json').stdout) as { samples: { rejectedByReason: Record<string, number> }; plausibility: { maxSeeingArcsec: number } };
    expect(standard.samples.rejectedByReason).toEqual({ implausible_seeing: 2 });
    expect(standard.plausibility.maxSeeingArcsec).toBe(10);
    const run = analyze(hostile('48-seeing-outside-window.csv'), '--json', '--max-plausible-seeing-arcsec', '60', '--min-plausible-seeing-arcsec=0.005');
    expect(run.status, run.stderr).toBe(0);
    const widened = JSON.parse(run.stdout) as { samples: { accepted: number; rejectedByReason: Record<string, number> }; plausibility: { minSeeingArcsec: number; maxSeeingArcsec: number } };
    expect(widened.samples).toMatchObject({ accepted: 20, rejectedByReason: {} });
    expect(widened.plausibility).toMatchObject({ minSeeingArcsec: 0.005, maxSeeingArcsec: 60 });
    const upsideDown = analyze(hostile('48-seeing-outside-window.csv'), '--min-plausible-seeing-arcsec', '5', '--max-plausible-seeing-arcsec', '1');
    expect(upsideDown.status).toBe(2);
  });
});
