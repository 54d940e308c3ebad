import { SeeingInputError } from '../errors.js';
import { normalCdf } from './normalCdf.js';

export interface MannWhitneyResult {
  /** U of the first sample: its rank sum minus nA (nA + 1) / 2 (average ranks for ties). */
  u: number;
  /** Normal-approximation z with tie correction and a 0.5 continuity correction; negative when the first sample ranks lower. */
  z: number;
  /** Two-sided p-value from z. */
  pValue: number;
  countA: number;
  countB: number;
}

/**
 * Mann–Whitney U test (Mann & Whitney 1947) of two independent samples, normal approximation with the
 * tie-corrected variance nA nB / 12 [(n + 1) − Σ(t³ − t) / (n (n − 1))] and a continuity correction of 0.5
 * (the asymptotic form most statistics packages use by default). Needs at least one value in each sample.
 * Example: mannWhitney([1, 2, 3], [4, 5, 6]) → { u: 0, z: −1.7457, pValue: 0.0809, … }.
 */
export function mannWhitney(sampleA: ArrayLike<number>, sampleB: ArrayLike<number>): MannWhitneyResult {
  const countA = sampleA.length;
  const countB = sampleB.length;
  if (countA === 0 || countB === 0) {
    throw new SeeingInputError(`mannWhitney needs at least one value in each sample, got ${countA} and ${countB}`);
  }
  const total = countA + countB;
  const pooled = new Float64Array(total);
  const isFromA = new Uint8Array(total);
  const order = new Uint32Array(total);
  for (let index = 0; index < countA; index += 1) pooled[index] = sampleA[index] ?? Number.NaN;
  for (let index = 0; index < countB; index += 1) pooled[countA + index] = sampleB[index] ?? Number.NaN;
  for (let index = 0; index < total; index += 1) {
    const value = pooled[index] ?? Number.NaN;
    if (!Number.isFinite(value)) throw new SeeingInputError(`mannWhitney needs finite values, got ${String(value)}`);
    order[index] = index;
    isFromA[index] = index < countA ? 1 : 0;
  }
  order.sort((left, right) => (pooled[left] ?? 0) - (pooled[right] ?? 0));

  let rankSumA = 0;
  let tieTerm = 0;
  let start = 0;
  while (start < total) {
    let end = start + 1;
    const value = pooled[order[start] ?? 0];
    while (end < total && pooled[order[end] ?? 0] === value) end += 1;
    const averageRank = (start + 1 + end) / 2; // ranks start..end-1 are 1-based start+1..end
    for (let position = start; position < end; position += 1) {
      if (isFromA[order[position] ?? 0] === 1) rankSumA += averageRank;
    }
    const tieSize = end - start;
    tieTerm += tieSize * tieSize * tieSize - tieSize;
    start = end;
  }

  const u = rankSumA - (countA * (countA + 1)) / 2;
  const meanU = (countA * countB) / 2;
  const varianceU = total > 1 ? ((countA * countB) / 12) * (total + 1 - tieTerm / (total * (total - 1))) : 0;
  if (!(varianceU > 0)) return { u, z: 0, pValue: 1, countA, countB };
  const distance = Math.max(0, Math.abs(u - meanU) - 0.5);
  const z = (Math.sign(u - meanU) * distance) / Math.sqrt(varianceU);
  const pValue = Math.min(1, 2 * (1 - normalCdf(Math.abs(z))));
  return { u, z, pValue, countA, countB };
}
