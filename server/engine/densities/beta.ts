import { fillNonFinite } from './fill';
import { digamma, lbeta } from './special';

/**
 * Beta log-density, one observation:
 *   log Beta(y | a, b) = (a − 1)·log y + (b − 1)·log1p(−y) − log B(a, b).
 * Partials: ∂y = (a − 1)/y − (b − 1)/(1 − y), ∂a = log y − ψ(a) + ψ(a + b),
 * ∂b = log1p(−y) − ψ(b) + ψ(a + b).
 *
 * Domains: 0 ≤ y ≤ 1; a, b finite and > 0.
 * Edges: any NaN → NaN; a ≤ 0 or b ≤ 0 or either +Infinity → NaN; y < 0 or y > 1 → −Infinity.
 * At y = 0: a < 1 → +Infinity, a = 1 → log b, a > 1 → −Infinity; at y = 1 the same with b (b = 1 → log a).
 * On the edges the partials are reported as 0 (samplers never evaluate there).
 * Partials elsewhere: NaN for a NaN value, 0 for −Infinity.
 * Examples: betaLpdf(0.5, 1, 1) = 0; betaLpdf(0.25, 2, 3) = log(12·0.25·0.75²) ≈ 0.52325;
 * betaLpdf(0, 0.5, 0.5) = +Infinity; betaLpdf(1.2, 2, 2) = −Infinity; betaLpdf(0.5, −1, 1) = NaN.
 */
export function betaLpdf(y: number, a: number, b: number): number {
  if (!(a > 0) || a === Infinity || !(b > 0) || b === Infinity || y !== y) return NaN;
  if (y < 0 || y > 1) return -Infinity;
  if (y === 0) return a < 1 ? Infinity : a === 1 ? Math.log(b) : -Infinity;
  if (y === 1) return b < 1 ? Infinity : b === 1 ? Math.log(a) : -Infinity;
  return (a - 1) * Math.log(y) + (b - 1) * Math.log1p(-y) - lbeta(a, b);
}

/** {@link betaLpdf} with partials (∂y, ∂a, ∂b) written to out[offset … offset+2]. */
export function betaLpdfGrad(
  y: number,
  a: number,
  b: number,
  out: Float64Array,
  offset: number,
): number {
  const v = betaLpdf(y, a, b);
  if (fillNonFinite(v, out, offset, 3) || y === 0 || y === 1) {
    if ((y === 0 || y === 1) && v === v) out[offset] = out[offset + 1] = out[offset + 2] = 0;
    return v;
  }
  const dab = digamma(a + b);
  out[offset] = (a - 1) / y - (b - 1) / (1 - y);
  out[offset + 1] = Math.log(y) - digamma(a) + dab;
  out[offset + 2] = Math.log1p(-y) - digamma(b) + dab;
  return v;
}
