import { fillNonFinite } from './fill';
import { digamma, lgamma } from './special';

/**
 * Gamma log-density (shape α, rate β), one observation:
 *   log Gamma(y | α, β) = α·log β − lgamma(α) + (α − 1)·log y − β·y.
 * Partials: ∂y = (α − 1)/y − β, ∂α = log β − ψ(α) + log y, ∂β = α/β − y.
 *
 * Domains: y ≥ 0; α finite and > 0; β finite and > 0.
 * Edges: any NaN → NaN; α ≤ 0, β ≤ 0 or either +Infinity → NaN; y < 0 or y = +Infinity → −Infinity.
 * At y = 0 (edge of the support): α < 1 → +Infinity, α = 1 → log β, α > 1 → −Infinity; the
 * partials there are reported as 0 (samplers never evaluate on the edge).
 * Partials elsewhere: NaN for a NaN value, 0 for −Infinity.
 * Examples: gammaLpdf(1, 1, 1) = −1; gammaLpdf(2, 3, 2) = 3·log 2 − log 2 + 2·log 2 − 4 ≈ −1.22741;
 * gammaLpdf(0, 0.5, 1) = +Infinity; gammaLpdf(−1, 2, 1) = −Infinity; gammaLpdf(1, 0, 1) = NaN.
 */
export function gammaLpdf(y: number, shape: number, rate: number): number {
  if (!(shape > 0) || shape === Infinity || !(rate > 0) || rate === Infinity || y !== y) return NaN;
  if (y < 0 || y === Infinity) return -Infinity;
  if (y === 0) return shape < 1 ? Infinity : shape === 1 ? Math.log(rate) : -Infinity;
  return shape * Math.log(rate) - lgamma(shape) + (shape - 1) * Math.log(y) - rate * y;
}

/** {@link gammaLpdf} with partials (∂y, ∂shape, ∂rate) written to out[offset … offset+2]. */
export function gammaLpdfGrad(
  y: number,
  shape: number,
  rate: number,
  out: Float64Array,
  offset: number,
): number {
  const v = gammaLpdf(y, shape, rate);
  if (fillNonFinite(v, out, offset, 3) || y === 0) {
    if (y === 0 && v === v) out[offset] = out[offset + 1] = out[offset + 2] = 0;
    return v;
  }
  out[offset] = (shape - 1) / y - rate;
  out[offset + 1] = Math.log(rate) - digamma(shape) + Math.log(y);
  out[offset + 2] = shape / rate - y;
  return v;
}
