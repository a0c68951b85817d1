import { fillNonFinite } from './fill';
import { HALF_LOG_2PI } from './special';

/**
 * Log-normal log-density, one observation:
 *   log LogNormal(y | μ, σ) = −log y − log σ − ½·log(2π) − ½·z², z = (log y − μ)/σ.
 * Partials: ∂y = −(1 + z/σ)/y, ∂μ = z/σ, ∂σ = (z² − 1)/σ.
 *
 * Domains: y > 0; μ finite; σ finite and > 0.
 * Edges: any NaN → NaN; σ ≤ 0 or +Infinity → NaN; μ = ±Infinity → NaN; y ≤ 0 (the density's
 * limit at 0 is 0) or y = +Infinity → −Infinity. Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: lognormalLpdf(1, 0, 1) = −½·log(2π) ≈ −0.91894; lognormalLpdf(e, 0, 1) ≈ −2.41894;
 * lognormalLpdf(0, 0, 1) = −Infinity; lognormalLpdf(−1, 0, 1) = −Infinity.
 */
export function lognormalLpdf(y: number, mu: number, sigma: number): number {
  if (!(sigma > 0) || sigma === Infinity || !(mu - mu === 0) || y !== y) return NaN;
  if (!(y > 0) || y === Infinity) return -Infinity;
  const ly = Math.log(y);
  const z = (ly - mu) / sigma;
  return -ly - Math.log(sigma) - HALF_LOG_2PI - 0.5 * z * z;
}

/** {@link lognormalLpdf} with partials (∂y, ∂μ, ∂σ) written to out[offset … offset+2]. */
export function lognormalLpdfGrad(
  y: number,
  mu: number,
  sigma: number,
  out: Float64Array,
  offset: number,
): number {
  const v = lognormalLpdf(y, mu, sigma);
  if (fillNonFinite(v, out, offset, 3)) return v;
  const z = (Math.log(y) - mu) / sigma;
  out[offset] = -(1 + z / sigma) / y;
  out[offset + 1] = z / sigma;
  out[offset + 2] = (z * z - 1) / sigma;
  return v;
}
