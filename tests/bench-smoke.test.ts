// Runs the whole bench at 10 000 rows so it cannot rot. It checks that results are produced and sane, never speed.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot } from './support/browser.ts';

describe('bench smoke run', () => {
  it('runs every benchmark on 10 000 rows and writes sane results with the machine', () => {
    const out = join(mkdtempSync(join(tmpdir(), 'calmcrest-bench-')), 'results.json');
    const run = spawnSync(join(repoRoot, 'node_modules/.bin/tsx'), [join(repoRoot, 'bench/run.ts'), '--rows', '10000', '--runs', '1', '--out', out], { cwd: repoRoot, encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    const results = JSON.parse(readFileSync(out, 'utf8')) as { rows: number; machine: { cpu: string; cores: number; node: string }; benchmarks: Record<string, Record<string, number | string>> };
    expect(results.rows).toBe(10000);
    expect(results.machine.cores).toBeGreaterThan(0);
    expect(results.machine.node).toBe(process.version);
    const analyzer = results.benchmarks.analyzer ?? {};
    expect(analyzer.rows).toBe(10000);
    // the seeded log has one damaged row in every 997, all of them rejected
    expect(analyzer.acceptedSamples).toBe(10000 - Math.floor(10000 / 997));
    expect(analyzer.rejectedRows).toBe(Math.floor(10000 / 997));
    expect(Number(analyzer.medianWallMs)).toBeGreaterThan(0);
    expect(Number(analyzer.peakRssMb)).toBeGreaterThan(10);
    expect(Number(analyzer.tsxMedianWallMs)).toBeGreaterThan(0);
    expect(Number(analyzer.medianSeeingArcsec)).toBeGreaterThan(0.3);
    expect(Number(analyzer.medianSeeingArcsec)).toBeLessThan(2);
    // the pandas peer ran beside the analyzer and agreed with it (the bench throws otherwise) on the same nights
    const peer = results.benchmarks.peer ?? {};
    expect(Number(peer.peerMedianWallMs)).toBeGreaterThan(0);
    expect(Number(peer.wallRatio)).toBeGreaterThan(0);
    expect(peer.medianSeeingArcsec).toBe(analyzer.medianSeeingArcsec);
    // the comparison: three cold first answers (after ingest, no snapshots, after a restart) on the same data
    const compare = results.benchmarks.compare ?? {};
    for (const key of ['comparisonColdAfterIngestMs', 'comparisonColdNoSnapshotsMs', 'comparisonColdAfterRestartMs', 'comparisonWarmMedianMs']) expect(Number(compare[key]), key).toBeGreaterThan(0);
    // survey scale, tiny: ten sites of the same log, every short summary on the map after the restart
    const survey = results.benchmarks.survey ?? {};
    expect(survey.sites).toBe(10);
    expect(survey.storedSamplesTotal).toBe(10 * (10000 - Math.floor(10000 / 997)));
    expect(survey.mapSitesWithSummary).toBe(10);
    expect(Number(survey.databaseBytesPerSample)).toBeGreaterThan(20);
    expect(Number(survey.serverRssAfterMapAndPagesMb)).toBeGreaterThan(50);
    // the web bench measured the built app's first-load JavaScript and a cold site page with all six charts drawn
    const web = results.benchmarks.web ?? {};
    expect(Number(web.signInInitialGzipKb)).toBeGreaterThan(20);
    expect(Number(web.sitesInitialGzipKb)).toBeGreaterThan(Number(web.signInInitialGzipKb));
    expect(Number(web.chartsOnDemandGzipKb)).toBeGreaterThan(20);
    expect(web.charts).toBe(6);
    expect(Number(web.medianInteractiveMs)).toBeGreaterThan(Number(web.medianChartsDrawnMs));
    for (const [name, figures] of Object.entries(results.benchmarks)) expect(Object.keys(figures).length, name).toBeGreaterThan(0);
  }, 180_000);
});
