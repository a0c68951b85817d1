import { fillNonFinite } from './fill';
import { HALF_LOG_2PI } from './special';

/**
 * Normal log-density, one observation:
 *   log N(y | μ, σ) = −½·((y − μ)/σ)² − log σ − ½·log(2π).
 * Partials with z = (y − μ)/σ: ∂y = −z/σ, ∂μ = z/σ, ∂σ = (z² − 1)/σ.
 *
 * Domains: y real; μ finite; σ finite and > 0.
 * Edges: any NaN argument → NaN; σ ≤ 0, σ = +Infinity or μ = ±Infinity → NaN;
 * y = ±Infinity → −Infinity.
 * Partials: NaN when the value is NaN, 0 when it is ±Infinity (this holds for every density here).
 * Examples: normalLpdf(0, 0, 1) = −½·log(2π) ≈ −0.91894; normalLpdf(1, 0, 2) ≈ −1.73709;
 * normalLpdf(0, 0, 0) = NaN; normalLpdf(Infinity, 0, 1) = −Infinity.
 */
export function normalLpdf(y: number, mu: number, sigma: number): number {
  if (!(sigma > 0) || sigma === Infinity || !(mu - mu === 0) || y !== y) return NaN;
  if (y === Infinity || y === -Infinity) return -Infinity;
  const z = (y - mu) / sigma;
  return -0.5 * z * z - Math.log(sigma) - HALF_LOG_2PI;
}

/** {@link normalLpdf} with partials (∂y, ∂μ, ∂σ) written to out[offset … offset+2]. */
export function normalLpdfGrad(
  y: number,
  mu: number,
  sigma: number,
  out: Float64Array,
  offset: number,
): number {
  const v = normalLpdf(y, mu, sigma);
  if (fillNonFinite(v, out, offset, 3)) return v;
  const z = (y - mu) / sigma;
  const dy = -z / sigma;
  out[offset] = dy;
  out[offset + 1] = -dy;
  out[offset + 2] = (z * z - 1) / sigma;
  return v;
}
