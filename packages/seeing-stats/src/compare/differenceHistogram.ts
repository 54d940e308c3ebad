import { SeeingInputError } from '../errors.js';

export interface DifferenceBin {
  /** Lower edge (included) and upper edge (excluded; the last bin includes it), arcsec. */
  lowArcsec: number;
  highArcsec: number;
  count: number;
}

/** At most this many bins: a wider spread doubles the bin width until it fits. */
const MAX_BINS = 40;

/**
 * Histogram of night-by-night seeing differences (A − B, arcsec) for the paired-comparison chart: bins of a fixed
 * width (default 0.05″, doubled until at most 40 bins cover the data) whose edges are whole multiples of the width,
 * so zero is always an edge and a reader sees at once how many nights fall on each side. Empty input gives no bins.
 * Throws SeeingInputError for a difference that is not finite or a width that is not a positive number of arcseconds.
 * Example: differenceHistogram([-0.07, -0.02, 0.01, 0.03]) → [−0.10, −0.05) 1, [−0.05, 0) 1, [0, 0.05] 2.
 */
export function differenceHistogram(differencesArcsec: ArrayLike<number>, options: { binWidthArcsec?: number } = {}): DifferenceBin[] {
  let width = options.binWidthArcsec ?? 0.05;
  if (!(width > 0 && Number.isFinite(width))) throw new SeeingInputError(`binWidthArcsec must be a positive number of arcseconds, got ${String(width)}`);
  const count = differencesArcsec.length;
  if (count === 0) return [];
  let lowest = Number.POSITIVE_INFINITY;
  let highest = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < count; index += 1) {
    const value = differencesArcsec[index] ?? Number.NaN;
    if (!Number.isFinite(value)) throw new SeeingInputError(`differencesArcsec must hold finite arcseconds, got ${String(value)} at index ${index}`);
    lowest = Math.min(lowest, value);
    highest = Math.max(highest, value);
  }
  // Edges in whole multiples of the width; a value exactly on the top edge closes the last bin.
  const edges = (binWidth: number) => {
    const first = Math.floor(lowest / binWidth + 1e-9);
    const last = Math.max(first + 1, Math.ceil(highest / binWidth - 1e-9));
    return { first, bins: last - first };
  };
  let span = edges(width);
  while (span.bins > MAX_BINS) {
    width *= 2;
    span = edges(width);
  }
  const counts = new Int32Array(span.bins);
  for (let index = 0; index < count; index += 1) {
    const value = differencesArcsec[index] ?? 0;
    const slot = Math.min(span.bins - 1, Math.max(0, Math.floor(value / width + 1e-9) - span.first));
    counts[slot] = (counts[slot] ?? 0) + 1;
  }
  return Array.from(counts, (binCount, slot) => ({
    lowArcsec: roundEdge((span.first + slot) * width),
    highArcsec: roundEdge((span.first + slot + 1) * width),
    count: binCount,
  }));
}

/** Edges as k × width carry floating-point dust (3 × 0.05 = 0.15000000000000002); twelve decimals are plenty. */
function roundEdge(edgeArcsec: number): number {
  return Math.round(edgeArcsec * 1e12) / 1e12;
}
