import { LINE_REJECT_REASONS } from './splitLog.js';

/**
 * Share of rows read that may be rejected (for reasons other than the filters) before a reading ends with a
 * warning: 10 % (a fraction). A healthy monitor log loses a few rows to dropouts; losing more means a wrong
 * unit, mapping, clock or export.
 */
export const WARN_UNUSABLE_SHARE = 0.1;

export type ReadingWarningCode = 'lines_not_split' | 'many_rows_unusable' | 'no_data_rows';

/** A warning about the file itself, in the same { code, message } shape as a summary's warnings. */
export interface ReadingWarning {
  code: ReadingWarningCode;
  /** One sentence a person can act on. */
  message: string;
}

export const READING_WARNING_CODES: readonly ReadingWarningCode[] = ['lines_not_split', 'many_rows_unusable', 'no_data_rows'];

/** Reasons that are choices of the person analysing (filters, excluded windows), never a sign of a bad file. */
const CHOSEN_REASONS = new Set(['zenith_limit', 'sun_above_limit', 'low_flux', 'anisotropic', 'excluded_window']);

function listCounts(entries: [string, number][]): string {
  return entries
    .sort((left, right) => right[1] - left[1])
    .map(([reason, count]) => `${reason} ${count}`)
    .join(', ');
}

/**
 * What a person must hear about a reading even though it finished: [] for a clean file. A warning is given when
 * (1) any line could not be split into fields (quote problems, over-long lines, wrong field count: the export
 * is damaged there), (2) more than WARN_UNUSABLE_SHARE of the rows read were rejected for reasons other than
 * the filters, or (3) the file has a header but no data rows. The analyzer prints these and the server lists
 * them with the upload, so a file that loses most of its rows never ends quietly.
 */
export function readingWarnings(counts: { read: number; rejectedByReason: Readonly<Record<string, number | undefined>> }): ReadingWarning[] {
  const warnings: ReadingWarning[] = [];
  const entries = Object.entries(counts.rejectedByReason).filter((entry): entry is [string, number] => (entry[1] ?? 0) > 0);
  if (counts.read === 0) {
    warnings.push({ code: 'no_data_rows', message: 'The file has a header line but no data rows.' });
    return warnings;
  }
  const lineProblems = entries.filter(([reason]) => (LINE_REJECT_REASONS as readonly string[]).includes(reason));
  const lineProblemCount = lineProblems.reduce((sum, [, count]) => sum + count, 0);
  if (lineProblemCount > 0) {
    warnings.push({
      code: 'lines_not_split',
      message: `${lineProblemCount} ${lineProblemCount === 1 ? 'line' : 'lines'} could not be split into fields (${listCounts(lineProblems)}); the export is damaged there: see the rejected rows for the line numbers.`,
    });
  }
  const unusable = entries.filter(([reason]) => !CHOSEN_REASONS.has(reason));
  const unusableCount = unusable.reduce((sum, [, count]) => sum + count, 0);
  if (unusableCount > counts.read * WARN_UNUSABLE_SHARE) {
    const sharePct = ((100 * unusableCount) / counts.read).toFixed(unusableCount === counts.read ? 0 : 1);
    warnings.push({
      code: 'many_rows_unusable',
      message: `${unusableCount} of ${counts.read} rows (${sharePct} %) could not be used (${listCounts(unusable)}), more than ${WARN_UNUSABLE_SHARE * 100} %; check the column mapping, units, monitor settings and clock.`,
    });
  }
  return warnings;
}
