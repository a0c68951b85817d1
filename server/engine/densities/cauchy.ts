import { fillNonFinite } from './fill';
import { LOG_PI } from './special';

/**
 * Cauchy log-density, one observation:
 *   log Cauchy(y | μ, σ) = −log π − log σ − log1p(z²), z = (y − μ)/σ.
 * Partials: ∂y = −2z/(σ(1 + z²)), ∂μ = −∂y, ∂σ = (z² − 1)/(σ(1 + z²)).
 *
 * Domains: y real; μ finite; σ finite and > 0.
 * Edges: any NaN → NaN; σ ≤ 0 or +Infinity → NaN; μ = ±Infinity → NaN; y = ±Infinity → −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: cauchyLpdf(0, 0, 1) = −log π ≈ −1.14473; cauchyLpdf(1, 0, 1) = −log(2π) ≈ −1.83788;
 * cauchyLpdf(0, 0, −1) = NaN.
 */
export function cauchyLpdf(y: number, mu: number, sigma: number): number {
  if (!(sigma > 0) || sigma === Infinity || !(mu - mu === 0) || y !== y) return NaN;
  if (y === Infinity || y === -Infinity) return -Infinity;
  const z = (y - mu) / sigma;
  return -LOG_PI - Math.log(sigma) - Math.log1p(z * z);
}

/** {@link cauchyLpdf} with partials (∂y, ∂μ, ∂σ) written to out[offset … offset+2]. */
export function cauchyLpdfGrad(
  y: number,
  mu: number,
  sigma: number,
  out: Float64Array,
  offset: number,
): number {
  const v = cauchyLpdf(y, mu, sigma);
  if (fillNonFinite(v, out, offset, 3)) return v;
  const z = (y - mu) / sigma;
  const q = 1 + z * z;
  const dy = (-2 * z) / (sigma * q);
  out[offset] = dy;
  out[offset + 1] = -dy;
  out[offset + 2] = (z * z - 1) / (sigma * q);
  return v;
}
