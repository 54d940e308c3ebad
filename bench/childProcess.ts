import { spawn } from 'node:child_process';

export interface ChildRun {
  wallMs: number;
  peakRssMb: number;
  /** CPU time the child used (user + system, all its threads), as it measured itself; NaN when it did not report. */
  cpuMs: number;
  exitCode: number | null;
  stdout: string;
  stderr: string;
}

/**
 * Runs `node <nodeArgs…>` once with bench/peak-memory.mjs preloaded and returns its wall time (spawn to exit,
 * so start-up counts) and the peak resident memory of the whole process as the child itself measured it.
 */
export function runMeasured(nodeArgs: readonly string[], cwd: string): Promise<ChildRun> {
  return new Promise((resolve, reject) => {
    const startedMs = performance.now();
    const child = spawn(process.execPath, ['--import', new URL('./peak-memory.mjs', import.meta.url).href, ...nodeArgs], {
      cwd,
      stdio: ['ignore', 'pipe', 'pipe', 'pipe'],
    });
    const stdout: Buffer[] = [];
    const stderr: Buffer[] = [];
    const report: Buffer[] = [];
    child.stdout?.on('data', (chunk: Buffer) => stdout.push(chunk));
    child.stderr?.on('data', (chunk: Buffer) => stderr.push(chunk));
    const reportStream = child.stdio[3];
    reportStream?.on('data', (chunk: Buffer) => report.push(chunk));
    child.on('error', reject);
    child.on('close', (exitCode) => {
      const wallMs = performance.now() - startedMs;
      let peakRssMb = Number.NaN;
      let cpuMs = Number.NaN;
      try {
        const reported = JSON.parse(Buffer.concat(report).toString('utf8')) as { maxRssKb: number; cpuMs?: number };
        peakRssMb = reported.maxRssKb / 1024;
        cpuMs = reported.cpuMs ?? Number.NaN;
      } catch {
        // leave NaN: the child died before reporting
      }
      resolve({ wallMs, peakRssMb, cpuMs, exitCode, stdout: Buffer.concat(stdout).toString('utf8'), stderr: Buffer.concat(stderr).toString('utf8') });
    });
  });
}

export function median(values: readonly number[]): number {
  const sorted = [...values].sort((left, right) => left - right);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? (sorted[middle] ?? Number.NaN) : ((sorted[middle - 1] ?? 0) + (sorted[middle] ?? 0)) / 2;
}
