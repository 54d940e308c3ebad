export interface BoxQuantiles {
  p10: number;
  p25: number;
  median: number;
  p75: number;
  p90: number;
}

/**
 * Pixel rows of a box plot drawn over a range bar that spans p10 (bottom) to p90 (top) on a linear axis:
 * `top`/`height` are the bar's own pixels, so each quantile is a linear interpolation inside them.
 */
export function boxGeometry(top: number, height: number, quantiles: BoxQuantiles) {
  const spanArcsec = quantiles.p90 - quantiles.p10;
  const rowOf = (valueArcsec: number) => (spanArcsec > 0 ? top + (height * (quantiles.p90 - valueArcsec)) / spanArcsec : top + height / 2);
  return { whiskerTop: rowOf(quantiles.p90), boxTop: rowOf(quantiles.p75), median: rowOf(quantiles.median), boxBottom: rowOf(quantiles.p25), whiskerBottom: rowOf(quantiles.p10) };
}
