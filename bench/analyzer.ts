// Benchmark: the command-line analyzer on a seeded synthetic log in the native format.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeSyntheticLog } from '../packages/seeing-stats/src/node/index.js'; // root scripts have no package of their own
import { median, runMeasured } from './childProcess.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: 'z-tilt' as const };
// An invented site; coordinates turn on the night filter so the sun computation is part of the work.
const site = { latitudeDeg: -27.42, longitudeDeg: -70.15, elevationM: 2650 };
const SEED = 20_250_301;

export async function run(options: { rows: number; runs?: number }): Promise<Record<string, number | string>> {
  const runs = options.runs ?? 5;
  const outDir = join(root, 'bench', 'out');
  mkdirSync(outDir, { recursive: true });
  const logPath = join(outDir, `native-${options.rows}-rows-seed-${SEED}-from-2018.csv`);
  if (!existsSync(logPath)) {
    const nights = Math.ceil(options.rows / 300) + 30; // about 300-600 rows a night at 60 s cadence, some nights lost
    const written = await writeSyntheticLog(logPath, { seed: SEED, site, startDate: '2018-01-01', nights, medianSeeingArcsec: 0.75, monitor, badRowEvery: 997, maxRows: options.rows });
    if (written.rows !== options.rows) throw new Error(`the synthetic log has ${written.rows} rows, wanted ${options.rows}`);
  }
  const analyzerArgs = [
    logPath,
    '--json',
    '--aperture-mm',
    String(monitor.apertureMm),
    '--baseline-mm',
    String(monitor.baselineMm),
    '--site-lat',
    String(site.latitudeDeg),
    '--site-lon',
    String(site.longitudeDeg),
  ];
  // The headline is the command users run: `npm run analyze` runs scripts/analyze.mjs, which imports the esbuild
  // bundle of the analyzer (building it first when missing or stale; one untimed run makes sure it is current).
  // Beside it, the same code through tsx (compiled on the fly at each start), and the whole `npm run` once more
  // with npm's own start-up, wall time only.
  const script = join(root, 'scripts', 'analyze.mjs');
  const warmUp = await runMeasured([script, ...analyzerArgs], root);
  if (warmUp.exitCode !== 0) throw new Error(`scripts/analyze.mjs exited with ${String(warmUp.exitCode)}: ${warmUp.stderr.slice(0, 500)}`);
  const bundled = await measure([script, ...analyzerArgs], runs);
  const viaTsx = await measure(['--import', 'tsx', join(root, 'apps', 'analyzer', 'src', 'main.ts'), ...analyzerArgs], runs);
  if (bundled.medianSeeingArcsec !== viaTsx.medianSeeingArcsec) throw new Error('the bundled analyzer disagrees with the tsx one');
  const npmWallMs: number[] = [];
  for (let attempt = 0; attempt < Math.min(runs, 3); attempt += 1) {
    const startedMs = performance.now();
    const result = spawnSync('npm', ['run', '--silent', 'analyze', '--', ...analyzerArgs], { cwd: root, stdio: ['ignore', 'ignore', 'pipe'] });
    if (result.status !== 0) throw new Error(`npm run analyze exited with ${String(result.status)}: ${result.stderr.toString('utf8').slice(0, 500)}`);
    npmWallMs.push(performance.now() - startedMs);
  }
  return {
    rows: options.rows,
    fileMb: Number((statSync(logPath).size / 1e6).toFixed(1)),
    runs,
    medianWallMs: bundled.medianWallMs,
    minWallMs: bundled.minWallMs,
    maxWallMs: bundled.maxWallMs,
    peakRssMb: bundled.peakRssMb,
    npmRunMedianWallMs: Math.round(median(npmWallMs)),
    tsxMedianWallMs: viaTsx.medianWallMs,
    tsxPeakRssMb: viaTsx.peakRssMb,
    acceptedSamples: bundled.acceptedSamples,
    rejectedRows: bundled.rejectedRows,
    medianSeeingArcsec: bundled.medianSeeingArcsec,
    command:
      'node scripts/analyze.mjs <log> --json --aperture-mm 60 --baseline-mm 200 --site-lat -27.42 --site-lon -70.15 (what npm run analyze runs; npmRun adds npm itself; tsx: node --import tsx apps/analyzer/src/main.ts …)',
  };
}

async function measure(nodeArgs: string[], runs: number): Promise<{ medianWallMs: number; minWallMs: number; maxWallMs: number; peakRssMb: number; acceptedSamples: number; rejectedRows: number; medianSeeingArcsec: number }> {
  const wallMs: number[] = [];
  const peakRssMb: number[] = [];
  let accepted = 0;
  let rejected = 0;
  let medianSeeing = Number.NaN;
  for (let attempt = 0; attempt < runs; attempt += 1) {
    const result = await runMeasured(nodeArgs, root);
    if (result.exitCode !== 0) throw new Error(`the analyzer exited with ${String(result.exitCode)}: ${result.stderr.slice(0, 500)}`);
    const report = JSON.parse(result.stdout) as { samples: { accepted: number; rejected: number }; seeing: { median: number } };
    accepted = report.samples.accepted;
    rejected = report.samples.rejected;
    medianSeeing = report.seeing.median;
    wallMs.push(result.wallMs);
    peakRssMb.push(result.peakRssMb);
  }
  return {
    medianWallMs: Math.round(median(wallMs)),
    minWallMs: Math.round(Math.min(...wallMs)),
    maxWallMs: Math.round(Math.max(...wallMs)),
    peakRssMb: Math.round(Math.max(...peakRssMb)),
    acceptedSamples: accepted,
    rejectedRows: rejected,
    medianSeeingArcsec: Number(medianSeeing.toFixed(6)),
  };
}
