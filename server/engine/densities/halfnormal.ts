import { fillNonFinite } from './fill';

/** ½·log(2/π). */
const HALF_LOG_2_OVER_PI = 0.5 * Math.log(2 / Math.PI);

/**
 * Half-normal log-density (the normal(0, σ) folded onto y ≥ 0), one observation:
 *   log HalfNormal(y | σ) = ½·log(2/π) − log σ − ½·(y/σ)².
 * Partials: ∂y = −y/σ², ∂σ = −1/σ + y²/σ³.
 *
 * Domains: y ≥ 0; σ finite and > 0.
 * Edges: any NaN → NaN; σ ≤ 0 or +Infinity → NaN; y < 0 or y = +Infinity → −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: halfnormalLpdf(0, 1) = ½·log(2/π) ≈ −0.22579; halfnormalLpdf(2, 2) ≈ −1.41894;
 * halfnormalLpdf(−0.5, 1) = −Infinity; halfnormalLpdf(1, 0) = NaN.
 */
export function halfnormalLpdf(y: number, sigma: number): number {
  if (!(sigma > 0) || sigma === Infinity || y !== y) return NaN;
  if (y < 0 || y === Infinity) return -Infinity;
  const z = y / sigma;
  return HALF_LOG_2_OVER_PI - Math.log(sigma) - 0.5 * z * z;
}

/** {@link halfnormalLpdf} with partials (∂y, ∂σ) written to out[offset … offset+1]. */
export function halfnormalLpdfGrad(y: number, sigma: number, out: Float64Array, offset: number): number {
  const v = halfnormalLpdf(y, sigma);
  if (fillNonFinite(v, out, offset, 2)) return v;
  const z = y / sigma;
  out[offset] = -z / sigma;
  out[offset + 1] = (z * z - 1) / sigma;
  return v;
}
