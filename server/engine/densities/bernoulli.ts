import { fillNonFinite } from './fill';
import { logistic, softplus } from './special';

/**
 * Bernoulli log-mass, one outcome k ∈ {0, 1}:
 *   log Bernoulli(k | p) = log p if k = 1, log1p(−p) if k = 0.
 * Partials: ∂k = 0, ∂p = 1/p if k = 1, −1/(1 − p) if k = 0.
 *
 * Domains: k ∈ {0, 1}; 0 ≤ p ≤ 1.
 * Edges: any NaN → NaN; p < 0 or p > 1 → NaN; k not 0 or 1 → −Infinity; bernoulliLpmf(1, 0) =
 * −Infinity; bernoulliLpmf(0, 1) = −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: bernoulliLpmf(1, 0.25) = log 0.25 ≈ −1.38629; bernoulliLpmf(0, 0.25) = log 0.75;
 * bernoulliLpmf(2, 0.5) = −Infinity; bernoulliLpmf(1, 1.1) = NaN.
 */
export function bernoulliLpmf(k: number, p: number): number {
  if (!(p >= 0 && p <= 1) || k !== k) return NaN;
  if (k === 1) return Math.log(p);
  if (k === 0) return Math.log1p(-p);
  return -Infinity;
}

/** {@link bernoulliLpmf} with partials (∂k = 0, ∂p) written to out[offset … offset+1]. */
export function bernoulliLpmfGrad(k: number, p: number, out: Float64Array, offset: number): number {
  const v = bernoulliLpmf(k, p);
  if (fillNonFinite(v, out, offset, 2)) return v;
  out[offset] = 0;
  out[offset + 1] = k === 1 ? 1 / p : -1 / (1 - p);
  return v;
}

/**
 * Bernoulli log-mass on the logit scale (p = logistic(η)), stable for any η:
 *   log Bernoulli(k | logistic(η)) = −softplus(−η) if k = 1, −softplus(η) if k = 0.
 * Partials: ∂k = 0, ∂η = k − logistic(η) (= logistic(−η) for k = 1, −logistic(η) for k = 0).
 *
 * Domains: k ∈ {0, 1}; η real, ±Infinity allowed.
 * Edges: any NaN → NaN; k not 0 or 1 → −Infinity; η = +Infinity: k = 1 → 0, k = 0 → −Infinity;
 * η = −Infinity: the mirror image. Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: bernoulliLogitLpmf(1, 0) = −log 2; bernoulliLogitLpmf(1, −800) = −800;
 * bernoulliLogitLpmf(0, 800) = −800; bernoulliLogitLpmf(1, 800) = −e^(−800) → −0.
 */
export function bernoulliLogitLpmf(k: number, eta: number): number {
  if (eta !== eta || k !== k) return NaN;
  if (k === 1) return -softplus(-eta);
  if (k === 0) return -softplus(eta);
  return -Infinity;
}

/** {@link bernoulliLogitLpmf} with partials (∂k = 0, ∂η) written to out[offset … offset+1]. */
export function bernoulliLogitLpmfGrad(k: number, eta: number, out: Float64Array, offset: number): number {
  const v = bernoulliLogitLpmf(k, eta);
  if (fillNonFinite(v, out, offset, 2)) return v;
  out[offset] = 0;
  out[offset + 1] = k === 1 ? logistic(-eta) : -logistic(eta);
  return v;
}
