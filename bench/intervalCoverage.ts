// Benchmark: coverage of the nominal 95 % whole-night bootstrap interval of the median on simulated campaigns of
// independent nights (the simulation the README's interval figures come from). Measures statistics, not speed.
import { simulateIntervalCoverage } from '../packages/seeing-stats/src/index.js'; // root scripts have no package of their own

const NIGHT_COUNTS = [1, 3, 5, 10, 30];
const SEED = 20_261_203;

export async function run(options: { rows: number; runs?: number }): Promise<Record<string, number | string>> {
  // 2 000 simulated campaigns per length at the full 1 000 000-row size; proportionally fewer for the smoke run.
  const trials = Math.min(2000, Math.max(40, Math.round(options.rows / 500)));
  const replicates = options.rows >= 1_000_000 ? 1000 : 200;
  const samplesPerNight = 60;
  const startMs = performance.now();
  const results = simulateIntervalCoverage({ nightCounts: NIGHT_COUNTS, trials, samplesPerNight, replicates, seed: SEED });
  const figures: Record<string, number | string> = {
    model: 'independent nights: level 0.8″ · exp(0.25 Z) per night, samples level · exp(0.1 Z′) within a night',
    trialsPerLength: trials,
    samplesPerNight,
    replicates,
    seed: SEED,
  };
  for (const result of results) figures[`coverage${result.nights}Nights`] = Number(result.coverage.toFixed(4));
  figures.wallMs = Math.round(performance.now() - startMs);
  return figures;
}
