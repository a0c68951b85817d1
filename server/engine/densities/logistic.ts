import { fillNonFinite } from './fill';
import { softplus } from './special';

/**
 * Logistic log-density, one observation:
 *   log Logistic(y | μ, s) = −z − log s − 2·log1p(e^(−z)), z = (y − μ)/s,
 * evaluated in the symmetric stable form −|z| − log s − 2·softplus(−|z|).
 * Partials: ∂y = −tanh(z/2)/s, ∂μ = tanh(z/2)/s, ∂s = (z·tanh(z/2) − 1)/s.
 *
 * Domains: y real; μ finite; s finite and > 0.
 * Edges: any NaN → NaN; s ≤ 0 or +Infinity → NaN; μ = ±Infinity → NaN; y = ±Infinity → −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: logisticLpdf(0, 0, 1) = −log 4 ≈ −1.38629; logisticLpdf(800, 0, 1) ≈ −800 (finite);
 * logisticLpdf(0, 0, −1) = NaN.
 */
export function logisticLpdf(y: number, mu: number, s: number): number {
  if (!(s > 0) || s === Infinity || !(mu - mu === 0) || y !== y) return NaN;
  if (y === Infinity || y === -Infinity) return -Infinity;
  const a = Math.abs((y - mu) / s);
  return -a - Math.log(s) - 2 * softplus(-a);
}

/** {@link logisticLpdf} with partials (∂y, ∂μ, ∂s) written to out[offset … offset+2]. */
export function logisticLpdfGrad(
  y: number,
  mu: number,
  s: number,
  out: Float64Array,
  offset: number,
): number {
  const v = logisticLpdf(y, mu, s);
  if (fillNonFinite(v, out, offset, 3)) return v;
  const z = (y - mu) / s;
  const t = Math.tanh(0.5 * z);
  out[offset] = -t / s;
  out[offset + 1] = t / s;
  out[offset + 2] = (z * t - 1) / s;
  return v;
}
