// Runs `npm run load` tiny (2 000 rows, 1 s, 5 connections, one ingest) so the load script cannot rot. It checks that
// every phase ran and answered without errors, never speed (the full run's figures are in the README).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot } from './support/browser.ts';

interface Figures {
  requests: number;
  errors: number;
  non2xx: number;
  p99Ms: number;
}

describe('load smoke run', () => {
  it('loads a site, hammers its summary and /api/health with and without an ingest, and writes the figures under "load"', () => {
    const out = join(mkdtempSync(join(tmpdir(), 'calmcrest-load-')), 'results.json');
    const args = [join(repoRoot, 'bench/load.ts'), '--rows', '2000', '--duration', '1', '--connections', '5', '--max-ingests', '1', '--out', out];
    const run = spawnSync(join(repoRoot, 'node_modules/.bin/tsx'), args, { cwd: repoRoot, encoding: 'utf8', timeout: 120_000 });
    expect(run.status, run.stderr).toBe(0);
    const { load } = JSON.parse(readFileSync(out, 'utf8')) as { load: Record<string, unknown> & Record<'summary' | 'health' | 'summaryDuringIngest' | 'healthDuringIngest', Figures> };
    // the seeded log has one damaged row in every 997
    expect(load.samplesStored).toBe(2000 - Math.floor(2000 / 997));
    for (const phase of ['summary', 'health', 'summaryDuringIngest', 'healthDuringIngest'] as const) {
      expect(load[phase].requests, phase).toBeGreaterThan(0);
      expect(load[phase].errors + load[phase].non2xx, phase).toBe(0);
      expect(load[phase].p99Ms, phase).toBeGreaterThan(0);
    }
    expect(load.ingestsDuringLoad).toBe(1);
    // The readers accept gzip, as browsers do, and get the summary compressed.
    expect(load.acceptEncoding).toMatch(/\bgzip\b/);
    expect(Number(load.summarySentKiB)).toBeLessThan(Number(load.summaryKiB));
    expect(Number(load.serverRssAfterAllCampaignsMb)).toBeGreaterThan(20);
  }, 150_000);
});
