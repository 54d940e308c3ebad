// Preloaded into a benchmarked child process (node --import): on exit it writes the process's peak resident
// memory and its CPU time (user + system, all threads) to file descriptor 3, which the bench opens as a pipe. Keeps the child's own stdout and stderr untouched.
import { writeSync } from "node:fs";

process.on("exit", () => {
  try {
    const usage = process.resourceUsage();
    writeSync(3, JSON.stringify({ maxRssKb: usage.maxRSS, cpuMs: (usage.userCPUTime + usage.systemCPUTime) / 1000 }));
  } catch {
    // No fd 3 (run outside the bench): nothing to report.
  }
});
