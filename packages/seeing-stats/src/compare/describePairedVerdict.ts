import type { PairedComparison } from '../summary/comparePairedNights.js';

/** How many decimals seeing differences are written with in the verdict sentences (0.01″ is below any monitor's accuracy). */
const DECIMALS = 2;

/**
 * A p-value as a reader meets it: "p < 0.001" below a thousandth, otherwise two significant figures ("p = 0.012").
 * Needs a number in [0, 1]. Example: formatPValue(0.0123) → 'p = 0.012'.
 */
export function formatPValue(pValue: number): string {
  if (pValue < 0.001) return 'p < 0.001';
  return `p = ${String(Number(pValue.toPrecision(2)))}`;
}

/** A signed seeing difference with a plus or minus sign (U+2212), e.g. '+0.05″', '−0.03″', '0.00″'. */
export function formatSignedArcsec(valueArcsec: number): string {
  const text = Math.abs(valueArcsec).toFixed(DECIMALS);
  if (Number(text) === 0) return `${text}″`;
  return `${valueArcsec < 0 ? '−' : '+'}${text}″`;
}

/**
 * The paired comparison of sites A and B in one plain sentence (the verdict the comparison table shows), from
 * comparePairedNights' result: which site is sharper and by how much in median seeing, with the 95 % interval of
 * the difference, the number of common nights and the Wilcoxon signed-rank p-value on the nightly medians; or "no
 * clear difference" with the interval of A − B when it includes zero; or, below 10 common nights, that there is no
 * verdict and why. An interval from 10–30 nights is called approximate (nightIntervalStatus).
 * Example: A sharper by 0.12″ (interval of A − B [−0.17, −0.07], 143 nights, p = 1e-5) →
 * 'Quartz Shoulder is sharper than Tern Ridge by 0.12″ in median seeing (95 % interval 0.07–0.17″, 143 common
 * nights; Wilcoxon signed-rank on nightly medians p < 0.001)'.
 */
export function describePairedVerdict(nameA: string, nameB: string, comparison: PairedComparison): string {
  const nights = comparison.commonNights;
  const nightWords = `${nights} common ${nights === 1 ? 'night' : 'nights'}`;
  const matched = comparison.matching === 'bins' ? `, matched in ${comparison.binMinutes ?? 0}-minute bins` : '';
  if (comparison.verdict === null || comparison.ci95 === null || comparison.medianDifferenceArcsec === null) {
    if (nights === 0) return `No common nights: ${nameA} and ${nameB} were never measured on the same night${matched}, so there is no paired comparison.`;
    return `No paired verdict for ${nameA} and ${nameB}: only ${nightWords}${matched}; at least 10 are needed.`;
  }
  const [low, high] = comparison.ci95;
  const approximate = comparison.interval.status === 'approximate' ? ', approximate' : '';
  const test = comparison.wilcoxon === null ? 'every nightly difference is zero' : `Wilcoxon signed-rank on nightly medians ${formatPValue(comparison.wilcoxon.pValue)}`;
  if (comparison.verdict === 'no_clear_difference') {
    return `No clear difference between ${nameA} and ${nameB} on ${nightWords}${matched} (${nameA} − ${nameB}: ${formatSignedArcsec(low)} to ${formatSignedArcsec(high)}, 95 % interval${approximate}; ${test}).`;
  }
  // A − B < 0 means A has the smaller (better) seeing; the interval is turned into one of the positive margin.
  const aSharper = comparison.verdict === 'a_sharper';
  const [sharper, other] = aSharper ? [nameA, nameB] : [nameB, nameA];
  const margin = Math.abs(comparison.medianDifferenceArcsec);
  const [marginLow, marginHigh] = aSharper ? [-high, -low] : [low, high];
  return `${sharper} is sharper than ${other} by ${margin.toFixed(DECIMALS)}″ in median seeing (95 % interval${approximate} ${marginLow.toFixed(DECIMALS)}–${marginHigh.toFixed(DECIMALS)}″, ${nightWords}${matched}; ${test}).`;
}
