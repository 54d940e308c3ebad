// Benchmark (issue 15): the analyzer against the script a careful analyst would write instead (bench/peer/summary.py,
// pandas/numpy), on the same seeded 1 000 000-row native log, in one paired run: the two alternate, five runs each,
// wall time from spawn to exit and each process's own peak resident memory. Checks that both give the same median,
// quartiles and nights, and that the analyzer's whole report still equals the reference one (requireSameReport). Needs Debian's python3-pandas, installed through apt-get when missing (as npm test does for
// chromium). Run through bench/run.ts (`npm run bench -- --only peer`) or alone: node_modules/.bin/tsx bench/peer.ts [rows].
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeSyntheticLog } from '../packages/seeing-stats/src/node/index.js';
import { median, runMeasured } from './childProcess.ts';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, response: 'z-tilt' as const };
const site = { latitudeDeg: -27.42, longitudeDeg: -70.15, elevationM: 2650 };
const SEED = 20_250_301; // the analyzer bench's log
/** Debian's own interpreter, which python3-pandas installs into (a python3 earlier on PATH, pyenv's say, may not see it). */
const PYTHON = existsSync('/usr/bin/python3') ? '/usr/bin/python3' : 'python3';
const FLAGS = ['--aperture-mm', String(monitor.apertureMm), '--baseline-mm', String(monitor.baselineMm), '--site-lat', String(site.latitudeDeg), '--site-lon', String(site.longitudeDeg)];

interface Figures {
  accepted: number;
  median: number;
  p25: number;
  p75: number;
  nights: number;
}

/** Debian's python3-pandas, installed through apt-get (as root, or through sudo) when python3 cannot import pandas. */
export function ensurePandas(): void {
  if (spawnSync(PYTHON, ['-c', 'import pandas, numpy'], { stdio: 'ignore' }).status === 0) return;
  console.log("bench peer: installing Debian's python3-pandas (apt-get)");
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  const aptGet = (...args: string[]) =>
    spawnSync(isRoot ? 'apt-get' : 'sudo', isRoot ? args : ['apt-get', ...args], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } }).status === 0;
  if (!aptGet('install', '-y', 'python3-pandas') && !(aptGet('update') && aptGet('install', '-y', 'python3-pandas'))) {
    throw new Error("Could not install python3-pandas with apt-get. Install Debian's python3-pandas package by hand (apt-get install -y python3-pandas) and run the bench again.");
  }
}

/** One run of the peer script: wall time (spawn to exit) and the peak memory it reports on stderr. */
function runPeer(logPath: string): Promise<{ wallMs: number; peakRssMb: number; cpuMs: number; figures: Figures }> {
  return new Promise((resolve, reject) => {
    const startedMs = performance.now();
    const child = spawn(PYTHON, [join(root, 'bench', 'peer', 'summary.py'), logPath, ...FLAGS], { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
    const stdout: Buffer[] = [];
    const stderr: Buffer[] = [];
    child.stdout.on('data', (chunk: Buffer) => stdout.push(chunk));
    child.stderr.on('data', (chunk: Buffer) => stderr.push(chunk));
    child.on('error', reject);
    child.on('close', (exitCode) => {
      const wallMs = performance.now() - startedMs;
      const errorText = Buffer.concat(stderr).toString('utf8');
      if (exitCode !== 0) return reject(new Error(`bench/peer/summary.py exited with ${String(exitCode)}: ${errorText.slice(0, 800)}`));
      const report = JSON.parse(Buffer.concat(stdout).toString('utf8')) as { accepted: number; nights: number; seeing: { median: number; p25: number; p75: number } };
      const usage = JSON.parse(errorText.trim().split('\n').pop() ?? '{}') as { maxRssKb?: number; cpuMs?: number };
      resolve({ wallMs, peakRssMb: (usage.maxRssKb ?? Number.NaN) / 1024, cpuMs: usage.cpuMs ?? Number.NaN, figures: { accepted: report.accepted, nights: report.nights, ...report.seeing } });
    });
  });
}

async function runAnalyzer(logPath: string): Promise<{ wallMs: number; peakRssMb: number; cpuMs: number; figures: Figures; report: unknown }> {
  const result = await runMeasured([join(root, 'scripts', 'analyze.mjs'), logPath, '--json', ...FLAGS], root);
  if (result.exitCode !== 0) throw new Error(`the analyzer exited with ${String(result.exitCode)}: ${result.stderr.slice(0, 500)}`);
  const report = JSON.parse(result.stdout) as { samples: { accepted: number }; nights: number; seeing: { median: number; p25: number; p75: number } };
  return {
    wallMs: result.wallMs,
    peakRssMb: result.peakRssMb,
    cpuMs: result.cpuMs,
    figures: { accepted: report.samples.accepted, nights: report.nights, median: report.seeing.median, p25: report.seeing.p25, p75: report.seeing.p75 },
    report,
  };
}

/** Relative tolerance of the exactness check: the same numbers as the reference, to rounding in the last bits at most. */
const EXACT_TOLERANCE = 1e-12;
/** The one report field that depends on the day it runs (the plausible times end one day after now). */
const DAY_DEPENDENT = '.plausibility.latestTimeUtc';

/**
 * The analyzer's whole JSON report against the one the analyzer gave on the same log before the speed work of
 * issue 15 (bench/peer/reference/analyzer-N-rows.json, written by main at b0c1ac6): every number within
 * EXACT_TOLERANCE relative (absolute below 1), every other value equal, no field or list item missing (fields added
 * to the report since, by new features, are not compared). Returns how many numbers
 * were compared, or null when there is no reference for this row count; throws naming the first difference.
 */
export function requireSameReport(report: unknown, rows: number): number | null {
  const referencePath = join(root, 'bench', 'peer', 'reference', `analyzer-${rows}-rows.json`);
  if (!existsSync(referencePath)) return null;
  const reference: unknown = JSON.parse(readFileSync(referencePath, 'utf8'));
  let numbers = 0;
  const differences: string[] = [];
  const walk = (expected: unknown, got: unknown, path: string): void => {
    if (path === DAY_DEPENDENT || differences.length >= 5) return;
    if (typeof expected === 'number' && typeof got === 'number') {
      numbers += 1;
      if (!(expected === got || Math.abs(expected - got) <= EXACT_TOLERANCE * Math.max(1, Math.abs(expected)))) differences.push(`${path}: ${expected} before, ${got} now`);
      return;
    }
    if (expected === null || got === null || typeof expected !== 'object' || typeof got !== 'object') {
      if (expected !== got) differences.push(`${path}: ${JSON.stringify(expected)} before, ${JSON.stringify(got)} now`);
      return;
    }
    if (Array.isArray(expected) !== Array.isArray(got)) {
      differences.push(`${path}: ${Array.isArray(expected) ? 'a list' : 'an object'} before, not now`);
      return;
    }
    // Every field of the reference, in the report too (a field added to the report since, by a new feature, is not compared).
    const keys = Array.isArray(expected) ? [...new Set([...Object.keys(expected), ...Object.keys(got)])] : Object.keys(expected);
    for (const key of keys) walk((expected as Record<string, unknown>)[key], (got as Record<string, unknown>)[key], `${path}.${key}`);
  };
  walk(reference, report, '');
  if (differences.length > 0) {
    throw new Error(`the analyzer's report differs from bench/peer/reference/analyzer-${rows}-rows.json (today's statistics must stay exact): ${differences.join('; ')}`);
  }
  return numbers;
}

/** Same median, quartiles (to 1e-9 relative: numpy's and V8's powers may differ in the last bit) and nights, or an error naming the figure. */
function requireAgreement(analyzer: Figures, peer: Figures): void {
  const close = (left: number, right: number) => Math.abs(left - right) <= 1e-9 * Math.abs(left);
  for (const key of ['median', 'p25', 'p75'] as const) {
    if (!close(analyzer[key], peer[key])) throw new Error(`the analyzer and the pandas peer disagree on ${key}: ${analyzer[key]} against ${peer[key]}`);
  }
  if (analyzer.nights !== peer.nights || analyzer.accepted !== peer.accepted) {
    throw new Error(`the analyzer and the pandas peer disagree: nights ${analyzer.nights} against ${peer.nights}, samples ${analyzer.accepted} against ${peer.accepted}`);
  }
}

export async function run(options: { rows: number; runs?: number }): Promise<Record<string, number | string>> {
  const runs = options.runs ?? 5;
  ensurePandas();
  const outDir = join(root, 'bench', 'out');
  mkdirSync(outDir, { recursive: true });
  const logPath = join(outDir, `native-${options.rows}-rows-seed-${SEED}-from-2018.csv`);
  if (!existsSync(logPath)) {
    const nights = Math.ceil(options.rows / 300) + 30;
    await writeSyntheticLog(logPath, { seed: SEED, site, startDate: '2018-01-01', nights, medianSeeingArcsec: 0.75, monitor, badRowEvery: 997, maxRows: options.rows });
  }
  // One untimed run each (builds the analyzer bundle when stale, warms the file cache), then alternate.
  const warmAnalyzer = await runAnalyzer(logPath);
  const warmPeer = await runPeer(logPath);
  requireAgreement(warmAnalyzer.figures, warmPeer.figures);
  const numbersCompared = requireSameReport(warmAnalyzer.report, options.rows);
  const analyzerWall: number[] = [];
  const peerWall: number[] = [];
  const analyzerRss: number[] = [];
  const peerRss: number[] = [];
  const analyzerCpu: number[] = [];
  const peerCpu: number[] = [];
  const pairs: string[] = [];
  for (let attempt = 0; attempt < runs; attempt += 1) {
    const analyzer = await runAnalyzer(logPath);
    const peer = await runPeer(logPath);
    requireAgreement(analyzer.figures, peer.figures);
    requireSameReport(analyzer.report, options.rows);
    analyzerWall.push(analyzer.wallMs);
    peerWall.push(peer.wallMs);
    analyzerRss.push(analyzer.peakRssMb);
    peerRss.push(peer.peakRssMb);
    analyzerCpu.push(analyzer.cpuMs);
    peerCpu.push(peer.cpuMs);
    pairs.push(`${Math.round(analyzer.wallMs)}/${Math.round(peer.wallMs)} ms = ${(analyzer.wallMs / peer.wallMs).toFixed(2)}`);
    console.log(
      `  pair ${attempt + 1}: analyzer ${Math.round(analyzer.wallMs)} ms (CPU ${Math.round(analyzer.cpuMs)} ms) ${Math.round(analyzer.peakRssMb)} MB, pandas ${Math.round(peer.wallMs)} ms (CPU ${Math.round(peer.cpuMs)} ms) ${Math.round(peer.peakRssMb)} MB, wall ratio ${(analyzer.wallMs / peer.wallMs).toFixed(2)}`,
    );
  }
  const pandasVersion = spawnSync(PYTHON, ['-c', 'import pandas, numpy, sys; print(pandas.__version__, numpy.__version__, sys.version.split()[0])'], { encoding: 'utf8' }).stdout.trim().split(' ');
  const analyzerMedianMs = median(analyzerWall);
  const peerMedianMs = median(peerWall);
  return {
    rows: options.rows,
    runs,
    analyzerMedianWallMs: Math.round(analyzerMedianMs),
    peerMedianWallMs: Math.round(peerMedianMs),
    wallRatio: Number((analyzerMedianMs / peerMedianMs).toFixed(2)),
    pairRatios: pairs.join('; '),
    // CPU time (user + system, all threads) as each process measured itself: on a machine shared with other work
    // the wall times also hold other processes' turns, the CPU times much less so.
    analyzerMedianCpuMs: Math.round(median(analyzerCpu)),
    peerMedianCpuMs: Math.round(median(peerCpu)),
    cpuRatio: Number((median(analyzerCpu) / median(peerCpu)).toFixed(2)),
    analyzerPeakRssMb: Math.round(Math.max(...analyzerRss)),
    peerPeakRssMb: Math.round(Math.max(...peerRss)),
    memoryRatio: Number((Math.max(...analyzerRss) / Math.max(...peerRss)).toFixed(2)),
    medianSeeingArcsec: Number(warmAnalyzer.figures.median.toFixed(6)),
    nights: warmAnalyzer.figures.nights,
    agreement: 'median, p25, p75 within 1e-9 relative; nights and accepted samples equal (checked on every run)',
    exactness:
      numbersCompared === null
        ? `not checked: no reference report for ${options.rows} rows in bench/peer/reference/`
        : `the whole JSON report equals bench/peer/reference/analyzer-${options.rows}-rows.json (the analyzer before issue 15's speed work): ${numbersCompared} numbers within ${EXACT_TOLERANCE} relative, every other value equal (checked on every run)`,
    peer: `${PYTHON} bench/peer/summary.py (pandas ${pandasVersion[0] ?? '?'}, numpy ${pandasVersion[1] ?? '?'}, Python ${pandasVersion[2] ?? '?'})`,
    analyzer: 'node scripts/analyze.mjs <log> --json --aperture-mm 60 --baseline-mm 200 --site-lat -27.42 --site-lon -70.15',
    loadAverage1Min: Number((await import('node:os')).loadavg()[0]?.toFixed(1)),
    runAt: new Date().toISOString(),
  };
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  console.log(await run({ rows: Number(process.argv[2] ?? 1_000_000), runs: Number(process.argv[3] ?? 5) }));
}
