// The engine part of a 4-site comparison on synthetic columns, in one process, with CPU time: what the summary
// worker computes for GET /api/comparisons once the columns are loaded (each site's summary, then every pair's
// paired and unpaired comparison). For profiling: node --cpu-prof --import tsx bench/compare-engine.ts [samplesPerSite]
import { comparePreparedPaired, comparePreparedUnpaired, createRandom, normalDeviate, prepareSite, sortPositive, summarizeSeeingPresorted } from "../packages/seeing-stats/src/index.ts";

const DAY_MS = 86_400_000;

/** Seeded columns: ~300 samples a night (a minute apart from 20:00 local), nights log-normal around the site's level. */
export function syntheticColumns(samples: number, medianArcsec: number, seed: number, longitudeDeg: number): { timeMs: Float64Array; seeingArcsec: Float64Array } {
  const random = createRandom(seed);
  const timeMs = new Float64Array(samples);
  const seeingArcsec = new Float64Array(samples);
  const start = Date.UTC(2018, 0, 1) - (longitudeDeg / 15) * 3_600_000;
  let index = 0;
  for (let night = 0; index < samples; night += 1) {
    if (random() < 0.12) continue; // a cloudy night: no samples
    const level = medianArcsec * Math.exp(0.25 * normalDeviate(random));
    const perNight = 150 + Math.floor(random() * 300);
    for (let k = 0; k < perNight && index < samples; k += 1, index += 1) {
      timeMs[index] = start + night * DAY_MS + 20 * 3_600_000 + k * 60_000;
      seeingArcsec[index] = level * Math.exp(0.15 * normalDeviate(random));
    }
  }
  return { timeMs, seeingArcsec };
}

export function runEngineComparison(sites: { timeMs: Float64Array; seeingArcsec: Float64Array; longitudeDeg: number }[]): { checksum: number; cpuMs: number; wallMs: number; stages: Record<string, number> } {
  const cpuStart = process.cpuUsage();
  const wallStart = performance.now();
  const stages: Record<string, number> = {};
  let mark = performance.now();
  const stage = (name: string) => {
    const now = performance.now();
    stages[name] = Math.round((stages[name] ?? 0) + now - mark);
    mark = now;
  };
  let checksum = 0;
  const sorts = sites.map((site) => sortPositive(site.seeingArcsec));
  stage("sort");
  for (const [index, site] of sites.entries()) {
    const summary = summarizeSeeingPresorted(site, sorts[index] ?? sortPositive(site.seeingArcsec), { longitudeDeg: site.longitudeDeg, latitudeDeg: -27, bootstrapReplicates: 1000, seed: 1 });
    checksum += (summary?.seeing.medianCi95?.[0] ?? 0) + (summary?.fractionBelowCi95["0.8"]?.[1] ?? 0);
  }
  stage("summaries");
  const prepared = sites.map((site, index) => prepareSite(site, sorts[index] ?? sortPositive(site.seeingArcsec), { longitudeDeg: site.longitudeDeg }));
  stage("prepare");
  for (let a = 0; a < sites.length; a += 1) {
    for (let b = a + 1; b < sites.length; b += 1) {
      const siteA = prepared[a];
      const siteB = prepared[b];
      if (!siteA || !siteB) continue;
      const paired = comparePreparedPaired(siteA, siteB, { bootstrapReplicates: 1000, seed: 1 });
      stage("paired");
      const unpaired = comparePreparedUnpaired(siteA, siteB, { bootstrapReplicates: 1000, seed: 1 });
      stage("unpaired");
      checksum += (paired.ci95?.[0] ?? 0) + unpaired.ci95[1];
    }
  }
  const cpu = process.cpuUsage(cpuStart);
  return { checksum, cpuMs: Math.round((cpu.user + cpu.system) / 1000), wallMs: Math.round(performance.now() - wallStart), stages };
}

if (process.argv[1]?.endsWith("compare-engine.ts")) {
  const samples = Number(process.argv[2] ?? 1_000_000);
  const sites = [0.68, 0.75, 0.82, 0.9].map((medianArcsec, index) => ({ ...syntheticColumns(samples, medianArcsec, 20_261_001 + index, -70.15), longitudeDeg: -70.15 }));
  console.log(JSON.stringify(runEngineComparison(sites)));
}
