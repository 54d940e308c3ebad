import { splitWhitespace, WHITESPACE_DELIMITER } from './delimiters.js';

const CANDIDATES = [',', ';', '\t'] as const;
export type LogDelimiter = (typeof CANDIDATES)[number] | typeof WHITESPACE_DELIMITER;

/**
 * Guesses the delimiter from the first lines of a file: the candidate (comma, semicolon, tab) that appears
 * the same non-zero number of times on every non-comment line, the most frequent if several do; otherwise the
 * most frequent overall; comma when none appears. A consistent count beats a decimal comma in a semicolon file.
 * When no candidate is consistent but every line splits into the same number (at least 2) of fields at runs of
 * spaces and tabs, the file is whitespace-separated (WHITESPACE_DELIMITER: columns aligned for the eye).
 * Example: detectDelimiter('a;b\n1,5;2,5') → ';'; detectDelimiter('date  time   seeing\n2025-03-01 23:15:00  0.8') → 'whitespace'.
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
  if (bestConsistentCount > 0) return best;
  const widths = lines.map((line) => splitWhitespace(line).length);
  const firstWidth = widths[0] ?? 0;
  if (firstWidth >= 2 && widths.every((width) => width === firstWidth)) return WHITESPACE_DELIMITER;
  return fallback;
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
