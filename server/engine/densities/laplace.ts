import { fillNonFinite } from './fill';
import { LN2 } from './special';

/**
 * Laplace (double-exponential) log-density, one observation:
 *   log Laplace(y | μ, b) = −log(2b) − |y − μ|/b.
 * Partials: ∂y = −sign(y − μ)/b, ∂μ = sign(y − μ)/b, ∂b = −1/b + |y − μ|/b².
 * At y = μ the density has a kink; the partials in y and μ are reported as 0 (a subgradient).
 *
 * Domains: y real; μ finite; b finite and > 0.
 * Edges: any NaN → NaN; b ≤ 0 or +Infinity → NaN; μ = ±Infinity → NaN; y = ±Infinity → −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: laplaceLpdf(0, 0, 1) = −log 2 ≈ −0.69315; laplaceLpdf(3, 1, 2) = −log 4 − 1 ≈ −2.38629;
 * laplaceLpdf(0, 0, 0) = NaN.
 */
export function laplaceLpdf(y: number, mu: number, b: number): number {
  if (!(b > 0) || b === Infinity || !(mu - mu === 0) || y !== y) return NaN;
  if (y === Infinity || y === -Infinity) return -Infinity;
  return -LN2 - Math.log(b) - Math.abs(y - mu) / b;
}

/** {@link laplaceLpdf} with partials (∂y, ∂μ, ∂b) written to out[offset … offset+2]. */
export function laplaceLpdfGrad(
  y: number,
  mu: number,
  b: number,
  out: Float64Array,
  offset: number,
): number {
  const v = laplaceLpdf(y, mu, b);
  if (fillNonFinite(v, out, offset, 3)) return v;
  const d = y - mu;
  const s = d > 0 ? 1 : d < 0 ? -1 : 0;
  out[offset] = -s / b;
  out[offset + 1] = s / b;
  out[offset + 2] = (-1 + Math.abs(d) / b) / b;
  return v;
}
