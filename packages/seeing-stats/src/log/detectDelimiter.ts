const CANDIDATES = [',', ';', '\t'] as const;
export type LogDelimiter = (typeof CANDIDATES)[number];

/**
 * Guesses the delimiter from the first lines of a file: the candidate (comma, semicolon, tab) that appears
 * the same non-zero number of times on every non-comment line, the most frequent if several do; otherwise the
 * most frequent overall; comma when none appears. A consistent count beats a decimal comma in a semicolon file.
 * Example: detectDelimiter('a;b\n1,5;2,5') → ';'.
 */
export function detectDelimiter(firstLines: string): LogDelimiter {
  const lines = firstLines
    .split(/\r\n|\n|\r/)
    .map((line) => line.replace(/^\uFEFF/, ''))
    .filter((line) => line.trim() !== '' && !line.trimStart().startsWith('#'))
    .slice(0, 20);
  let best: LogDelimiter = ',';
  let bestConsistentCount = 0;
  let fallback: LogDelimiter = ',';
  let fallbackTotal = 0;
  for (const candidate of CANDIDATES) {
    const counts = lines.map((line) => countOutsideQuotes(line, candidate));
    const first = counts[0] ?? 0;
    const consistent = first > 0 && counts.every((count) => count === first);
    if (consistent && first > bestConsistentCount) {
      best = candidate;
      bestConsistentCount = first;
    }
    const total = counts.reduce((sum, count) => sum + count, 0);
    if (total > fallbackTotal) {
      fallback = candidate;
      fallbackTotal = total;
    }
  }
  return bestConsistentCount > 0 ? best : fallback;
}

function countOutsideQuotes(line: string, delimiter: string): number {
  let count = 0;
  let quoted = false;
  for (const character of line) {
    if (character === '"') quoted = !quoted;
    else if (!quoted && character === delimiter) count += 1;
  }
  return count;
}
