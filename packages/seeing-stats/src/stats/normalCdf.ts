/**
 * Standard normal cumulative distribution Φ(x) = erfc(−x/√2)/2, with the Chebyshev-fitted erfc of
 * Press et al., Numerical Recipes (2nd ed., §6.2, "erfcc"; fractional error < 1.2e-7 everywhere).
 * Example: normalCdf(1.959964) → 0.975.
 */
export function normalCdf(x: number): number {
  return 0.5 * complementaryErrorFunction(-x / Math.SQRT2);
}

function complementaryErrorFunction(x: number): number {
  const magnitude = Math.abs(x);
  const t = 1 / (1 + 0.5 * magnitude);
  const tail =
    t *
    Math.exp(
      -magnitude * magnitude -
        1.26551223 +
        t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? tail : 2 - tail;
}
