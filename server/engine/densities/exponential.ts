import { fillNonFinite } from './fill';

/**
 * Exponential log-density (rate λ), one observation:
 *   log Exp(y | λ) = log λ − λ·y.
 * Partials: ∂y = −λ, ∂λ = 1/λ − y (at y = 0 these are the one-sided derivatives).
 *
 * Domains: y ≥ 0; λ finite and > 0.
 * Edges: any NaN → NaN; λ ≤ 0 or +Infinity → NaN; y < 0 or y = +Infinity → −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: exponentialLpdf(0, 2) = log 2 ≈ 0.69315; exponentialLpdf(1.5, 2) = log 2 − 3;
 * exponentialLpdf(−0.1, 2) = −Infinity; exponentialLpdf(1, 0) = NaN.
 */
export function exponentialLpdf(y: number, rate: number): number {
  if (!(rate > 0) || rate === Infinity || y !== y) return NaN;
  if (y < 0 || y === Infinity) return -Infinity;
  return Math.log(rate) - rate * y;
}

/** {@link exponentialLpdf} with partials (∂y, ∂rate) written to out[offset … offset+1]. */
export function exponentialLpdfGrad(y: number, rate: number, out: Float64Array, offset: number): number {
  const v = exponentialLpdf(y, rate);
  if (fillNonFinite(v, out, offset, 2)) return v;
  out[offset] = -rate;
  out[offset + 1] = 1 / rate - y;
  return v;
}
