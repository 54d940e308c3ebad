import { SeeingInputError } from '../errors.js';
import { normalCdf } from './normalCdf.js';

export interface WilcoxonSignedRankResult {
  /** Sum of the ranks of the positive differences (average ranks for ties). */
  rankSumPositive: number;
  /** Sum of the ranks of the negative differences. */
  rankSumNegative: number;
  /** min(rankSumPositive, rankSumNegative): the statistic SciPy's `wilcoxon` reports for the two-sided test. */
  statistic: number;
  /** Differences left after zeros are dropped. */
  count: number;
  /** Zero differences dropped before ranking (Wilcoxon's original treatment, SciPy's default zero_method='wilcox'). */
  zeros: number;
  /** Two-sided p-value. */
  pValue: number;
  /** 'exact' (the exact null distribution: up to 50 non-zero differences, no ties) or 'normal' (normal approximation). */
  method: 'exact' | 'normal';
  /** z of the normal approximation (null for the exact method); negative when the negative differences dominate. */
  z: number | null;
}

/** Up to this many non-zero differences without ties the exact null distribution is used (as SciPy does). */
const EXACT_MAX_COUNT = 50;

/**
 * Wilcoxon signed-rank test (Wilcoxon 1945) that paired differences are symmetric about zero, two-sided.
 * Zero differences are dropped; the absolute differences are ranked with average ranks for ties. With at most
 * 50 non-zero differences and no tied magnitudes the p-value is exact (the null distribution of the positive rank
 * sum counted over all 2^n sign patterns), as scipy.stats.wilcoxon(method='exact'); otherwise it comes from the
 * normal approximation with mean n(n+1)/4 and the tie-corrected variance n(n+1)(2n+1)/24 − Σ(t³ − t)/48, without
 * continuity correction, as scipy.stats.wilcoxon(method='approx') (zero_method='wilcox', correction=False, SciPy's
 * defaults). Nightly medians are continuous, so ties are rare and the exact path is the usual one.
 * Needs at least one non-zero finite difference. Throws SeeingInputError otherwise.
 * Example: wilcoxonSignedRank([1.5, -0.5, 2, 3, 4]) → { statistic: 1, pValue: 0.125, method: 'exact', … }.
 */
export function wilcoxonSignedRank(differences: ArrayLike<number>): WilcoxonSignedRankResult {
  const nonZero: number[] = [];
  let zeros = 0;
  for (let index = 0; index < differences.length; index += 1) {
    const difference = differences[index] ?? Number.NaN;
    if (!Number.isFinite(difference)) throw new SeeingInputError(`wilcoxonSignedRank needs finite differences, got ${String(difference)} at index ${index}`);
    if (difference === 0) zeros += 1;
    else nonZero.push(difference);
  }
  const count = nonZero.length;
  if (count === 0) throw new SeeingInputError(`wilcoxonSignedRank needs at least one non-zero difference, got ${differences.length} differences, all zero`);
  const order = nonZero.map((_, index) => index).sort((left, right) => Math.abs(nonZero[left] ?? 0) - Math.abs(nonZero[right] ?? 0));
  let rankSumPositive = 0;
  let tieTerm = 0;
  let start = 0;
  while (start < count) {
    let end = start + 1;
    const magnitude = Math.abs(nonZero[order[start] ?? 0] ?? 0);
    while (end < count && Math.abs(nonZero[order[end] ?? 0] ?? 0) === magnitude) end += 1;
    const averageRank = (start + 1 + end) / 2;
    const tied = end - start;
    tieTerm += tied ** 3 - tied;
    for (let position = start; position < end; position += 1) if ((nonZero[order[position] ?? 0] ?? 0) > 0) rankSumPositive += averageRank;
    start = end;
  }
  const totalRank = (count * (count + 1)) / 2;
  const rankSumNegative = totalRank - rankSumPositive;
  const statistic = Math.min(rankSumPositive, rankSumNegative);
  if (count <= EXACT_MAX_COUNT && tieTerm === 0) {
    return { rankSumPositive, rankSumNegative, statistic, count, zeros, pValue: exactTwoSidedP(count, statistic), method: 'exact', z: null };
  }
  const mean = totalRank / 2;
  const variance = (count * (count + 1) * (2 * count + 1)) / 24 - tieTerm / 48;
  const z = variance > 0 ? (rankSumPositive - mean) / Math.sqrt(variance) : 0;
  const pValue = Math.min(1, 2 * normalCdf(-Math.abs(z)));
  return { rankSumPositive, rankSumNegative, statistic, count, zeros, pValue, method: 'normal', z };
}

/** P(T ≤ statistic) doubled, capped at 1, under the exact null distribution of the positive rank sum of n ranks. */
function exactTwoSidedP(count: number, statistic: number): number {
  const maximum = (count * (count + 1)) / 2;
  // ways[s] = number of subsets of {1..n} whose sum is s (each subset = one sign pattern).
  const ways = new Float64Array(maximum + 1);
  ways[0] = 1;
  for (let rank = 1; rank <= count; rank += 1) {
    for (let sum = maximum; sum >= rank; sum -= 1) ways[sum] = (ways[sum] ?? 0) + (ways[sum - rank] ?? 0);
  }
  const patterns = 2 ** count;
  let atMost = 0;
  for (let sum = 0; sum <= Math.floor(statistic); sum += 1) atMost += ways[sum] ?? 0;
  return Math.min(1, (2 * atMost) / patterns);
}
