// Preloaded into a benchmarked child process (node --import): on exit it writes the process's peak resident
// memory to file descriptor 3, which the bench opens as a pipe. Keeps the child's own stdout and stderr untouched.
import { writeSync } from "node:fs";

process.on("exit", () => {
  try {
    writeSync(3, JSON.stringify({ maxRssKb: process.resourceUsage().maxRSS }));
  } catch {
    // No fd 3 (run outside the bench): nothing to report.
  }
});
