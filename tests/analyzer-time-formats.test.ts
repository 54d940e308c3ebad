// The analyzer's time formats on their sample logs (counts documented in data-samples/README.md).
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot } from './support/browser.ts';

interface Report {
  samples: { read: number; accepted: number; rejected: number; rejectedByReason: Record<string, number>; firstTimeUtc: string; lastTimeUtc: string };
  rejectedRows: { line: number; reason: string; message: string }[];
}

function analyze(...args: string[]): { status: number | null; report: Report | null; stderr: string } {
  const result = spawnSync(join(repoRoot, 'node_modules/.bin/tsx'), [join(repoRoot, 'apps/analyzer/src/main.ts'), ...args, '--json'], { cwd: repoRoot, encoding: 'utf8' });
  return { status: result.status, report: result.stdout ? (JSON.parse(result.stdout) as Report) : null, stderr: result.stderr };
}

const sample = (name: string): string => join(repoRoot, 'data-samples', name);

describe('analyzer time formats', () => {
  it('reads Julian dates with --time-format jd: 120 rows, 119 accepted, the ISO time on line 42 unreadable', () => {
    const run = analyze(sample('time-jd.csv'), '--time-format', 'jd', '--map', 'time_utc=jd');
    expect(run.status, run.stderr).toBe(0);
    expect(run.report?.samples).toMatchObject({ read: 120, accepted: 119, rejected: 1, rejectedByReason: { unreadable_time: 1 } });
    // The file starts at JD 2460837.45833333 = 2025-06-10T23:00:00Z, 2-minute cadence (data-samples/generate.ts).
    expect(run.report?.samples.firstTimeUtc).toBe('2025-06-10T23:00:00.000Z');
    expect(run.report?.samples.lastTimeUtc).toBe('2025-06-11T02:58:00.000Z');
    expect(run.report?.rejectedRows).toEqual([{ line: 42, reason: 'unreadable_time', message: '"2025-06-11T00:18:00Z" is not a Julian date like 2460736.46875' }]);
  });

  it('without --time-format the same file loses every row to unreadable_time, and says so (exit 3)', () => {
    const run = analyze(sample('time-jd.csv'), '--map', 'time_utc=jd');
    expect(run.status).toBe(3);
    expect(run.report?.samples).toMatchObject({ read: 120, accepted: 1, rejectedByReason: { unreadable_time: 119 } });
  });

  it('reads day-first local times with --time-format dmy --utc-offset +02:00, and 31 June as unreadable', () => {
    const run = analyze(sample('time-dmy-local.csv'), '--time-format', 'dmy', '--utc-offset', '+02:00', '--map', 'time_utc=Date/time (local)', '--map', 'seeing_arcsec=Seeing', '--map', 'zenith_deg=Zenith');
    expect(run.status, run.stderr).toBe(0);
    expect(run.report?.samples).toMatchObject({ read: 100, accepted: 99, rejected: 1, rejectedByReason: { unreadable_time: 1 } });
    // 11/06/2025 01:00:00 at UTC+02:00 is 2025-06-10T23:00:00Z.
    expect(run.report?.samples.firstTimeUtc).toBe('2025-06-10T23:00:00.000Z');
    expect(run.report?.rejectedRows.map((row) => row.line)).toEqual([31]);
  });

  it('refuses an unknown time format or offset with the way to write it (exit 2)', () => {
    const format = analyze(sample('time-jd.csv'), '--time-format', 'julian');
    expect(format.status).toBe(2);
    expect(format.stderr).toMatch(/--time-format must be one of iso, jd, mjd, dmy, mdy, got "julian"/);
    const offset = analyze(sample('time-jd.csv'), '--utc-offset', 'two hours');
    expect(offset.status).toBe(2);
    expect(offset.stderr).toMatch(/--utc-offset: the UTC offset must be written like \+02:00/);
  });
});
