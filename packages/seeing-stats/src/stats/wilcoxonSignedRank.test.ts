import { describe, expect, it } from 'vitest';
import { wilcoxonSignedRank } from './wilcoxonSignedRank.js';

// Every reference value below was computed with SciPy 1.17.1 (python3-scipy), scipy.stats.wilcoxon(x, method=…),
// with SciPy's defaults otherwise (zero_method='wilcox', correction=False, alternative='two-sided').
// Normal-approximation p-values go through normalCdf, whose erfc (Numerical Recipes "erfcc") has a fractional
// error below 1.2e-7, so those are compared to a relative 2e-7; exact p-values to 12 decimals.
const closeRelative = (actual: number, expected: number): void => expect(Math.abs(actual - expected) / expected).toBeLessThan(2e-7);
describe('wilcoxonSignedRank', () => {
  it('matches SciPy exactly on five differences', () => {
    // scipy.stats.wilcoxon([1.5, -0.5, 2, 3, 4]) → statistic 1.0, pvalue 0.125
    const result = wilcoxonSignedRank([1.5, -0.5, 2, 3, 4]);
    expect(result.statistic).toBe(1);
    expect(result.rankSumPositive).toBe(14);
    expect(result.method).toBe('exact');
    expect(result.pValue).toBeCloseTo(0.125, 12);
  });
  it('matches SciPy\'s exact p-value on twelve nightly differences', () => {
    // scipy.stats.wilcoxon([0.12, -0.05, 0.31, 0.08, 0.22, -0.14, 0.19, 0.27, 0.04, 0.16, -0.02, 0.35]) → 10.0, 0.02099609375
    const result = wilcoxonSignedRank([0.12, -0.05, 0.31, 0.08, 0.22, -0.14, 0.19, 0.27, 0.04, 0.16, -0.02, 0.35]);
    expect(result.statistic).toBe(10);
    expect(result.pValue).toBeCloseTo(0.02099609375, 12);
  });
  it('drops zero differences and stays exact without ties, as SciPy\'s method="exact"', () => {
    // scipy.stats.wilcoxon([0.1, 0.12, -0.2, 0.3, 0.0, 0.4, -0.11, 0.25, 0.31, 0.15], method='exact') → 7.0, 0.07421875
    const result = wilcoxonSignedRank([0.1, 0.12, -0.2, 0.3, 0.0, 0.4, -0.11, 0.25, 0.31, 0.15]);
    expect(result.zeros).toBe(1);
    expect(result.count).toBe(9);
    expect(result.statistic).toBe(7);
    expect(result.method).toBe('exact');
    expect(result.pValue).toBeCloseTo(0.07421875, 12);
  });
  it('uses the tie-corrected normal approximation with ties, as SciPy\'s method="approx"', () => {
    // scipy.stats.wilcoxon([0.1, 0.1, -0.2, 0.3, 0.0, 0.4, -0.1, 0.25, 0.3, 0.15], method='approx') → 7.0, 0.06512650367135635
    const result = wilcoxonSignedRank([0.1, 0.1, -0.2, 0.3, 0.0, 0.4, -0.1, 0.25, 0.3, 0.15]);
    expect(result.method).toBe('normal');
    expect(result.statistic).toBe(7);
    closeRelative(result.pValue, 0.06512650367135635);
  });
  it('matches SciPy on sixty rounded differences with ties and zeros', () => {
    // x = [round(0.1 sin(1.7 i) + 0.03, 2) for i in 1..60]; scipy.stats.wilcoxon(x) → 428.5, 0.001546879298517218
    const differences = Array.from({ length: 60 }, (_, index) => Math.round((0.1 * Math.sin((index + 1) * 1.7) + 0.03) * 100) / 100);
    const result = wilcoxonSignedRank(differences);
    expect(result.statistic).toBe(428.5);
    expect(result.method).toBe('normal');
    closeRelative(result.pValue, 0.001546879298517218);
    // norm.isf(p / 2) = 3.1657419985933193 (SciPy): the positive differences dominate, so z is positive
    expect(result.z).toBeCloseTo(3.1657419985933193, 12);
  });
  it('refuses all-zero and non-finite differences', () => {
    expect(() => wilcoxonSignedRank([0, 0])).toThrow(/at least one non-zero difference/);
    expect(() => wilcoxonSignedRank([0.1, Number.POSITIVE_INFINITY])).toThrow(/finite differences, got Infinity at index 1/);
  });
});
