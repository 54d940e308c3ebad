// `npm run bench`: runs every benchmark module and prints and writes bench/results.json with the machine it ran on.
// Add a benchmark by adding a module that exports run({ rows }) to BENCHMARKS. Speed is measured, never asserted.
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { cpus, totalmem, type as osType, release } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export interface BenchmarkModule {
  run(options: { rows: number; runs?: number }): Promise<Record<string, number | string>>;
}

const BENCHMARKS: Record<string, () => Promise<BenchmarkModule>> = {
  analyzer: () => import('./analyzer.ts'),
  ingest: () => import('./ingest.ts'),
  withdraw: () => import('./withdraw.ts'),
  compare: () => import('./compare.ts'),
  survey: () => import('./survey.ts'),
  peer: () => import('./peer.ts'),
  intervalCoverage: () => import('./intervalCoverage.ts'),
  web: () => import('./web.ts'),
};

function parseFlags(argv: readonly string[]): { rows: number; runs: number; out: string; only: string[] } {
  const root = join(dirname(fileURLToPath(import.meta.url)), '..');
  let rows = 1_000_000;
  let runs = 5;
  let out = join(root, 'bench', 'results.json');
  const only: string[] = [];
  for (let index = 0; index < argv.length; index += 1) {
    const flag = argv[index];
    const value = argv[index + 1];
    index += 1;
    if (flag === '--rows' && Number(value) >= 1) rows = Math.floor(Number(value));
    else if (flag === '--runs' && Number(value) >= 1) runs = Math.floor(Number(value));
    else if (flag === '--out' && value !== undefined) out = resolve(value);
    else if (flag === '--only' && value !== undefined) only.push(...value.split(','));
    else throw new Error(`bench: unknown or incomplete flag ${String(flag)} (flags: --rows N --runs N --out FILE --only a,b)`);
  }
  return { rows, runs, out, only };
}

const flags = parseFlags(process.argv.slice(2));
const processor = cpus()[0];
const results: Record<string, unknown> = {
  date: new Date().toISOString(),
  machine: {
    cpu: processor?.model ?? 'unknown',
    cores: cpus().length,
    memoryGb: Number((totalmem() / 2 ** 30).toFixed(1)),
    node: process.version,
    os: `${osType()} ${release()}`,
  },
  rows: flags.rows,
  benchmarks: {} as Record<string, Record<string, number | string>>,
};
const benchmarks = results.benchmarks as Record<string, Record<string, number | string>>;
for (const [name, load] of Object.entries(BENCHMARKS)) {
  if (flags.only.length > 0 && !flags.only.includes(name)) continue;
  console.log(`bench ${name}: ${flags.rows} rows, ${flags.runs} runs…`);
  const module = await load();
  benchmarks[name] = await module.run({ rows: flags.rows, runs: flags.runs });
  console.log(benchmarks[name]);
}
// A run of some benchmarks (--only) keeps the figures of the others already in the file; every run keeps keys other
// tools own there (the load test's `load`).
const previous = existsSync(flags.out) ? (JSON.parse(readFileSync(flags.out, 'utf8')) as Record<string, unknown>) : {};
const previousBenchmarks = flags.only.length > 0 ? ((previous.benchmarks ?? {}) as Record<string, unknown>) : {};
// The top-level date and machine stay those of the last full run; a partial run's figures carry their own `runAt`.
const partialKeep = flags.only.length > 0 ? { date: previous.date ?? results.date, machine: previous.machine ?? results.machine } : {};
writeFileSync(flags.out, `${JSON.stringify({ ...previous, ...results, ...partialKeep, benchmarks: { ...previousBenchmarks, ...benchmarks } }, null, 2)}\n`);
console.log(`machine: ${JSON.stringify(results.machine)}\nwritten: ${flags.out}`);
