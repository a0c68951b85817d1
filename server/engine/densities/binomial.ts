import { fillNonFinite } from './fill';
import { lchoose, logistic, softplus } from './special';

/**
 * Binomial log-mass, one count of successes k in n trials:
 *   log Binomial(k | n, p) = log C(n, k) + k·log p + (n − k)·log1p(−p).
 * Partials: ∂k = 0, ∂n = 0 (discrete), ∂p = k/p − (n − k)/(1 − p).
 *
 * Domains: n a non-negative integer; k an integer with 0 ≤ k ≤ n; 0 ≤ p ≤ 1.
 * Edges: any NaN → NaN; n negative, non-integer or infinite → NaN; p < 0 or p > 1 → NaN;
 * k non-integer or outside 0…n → −Infinity; p = 0: k = 0 → 0, else −Infinity; p = 1: k = n → 0,
 * else −Infinity (at p = 0 or 1 with a finite value, ∂p is the one-sided derivative −n or n).
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: binomialLpmf(3, 10, 0.5) = log(120/1024) ≈ −2.14398; binomialLpmf(0, 5, 0) = 0;
 * binomialLpmf(6, 5, 0.5) = −Infinity; binomialLpmf(1, 5, 1.5) = NaN.
 */
export function binomialLpmf(k: number, n: number, p: number): number {
  if (!(n >= 0) || Math.floor(n) !== n || n === Infinity) return NaN;
  if (!(p >= 0 && p <= 1) || k !== k) return NaN;
  if (k < 0 || k > n || Math.floor(k) !== k) return -Infinity;
  if (p === 0) return k === 0 ? 0 : -Infinity;
  if (p === 1) return k === n ? 0 : -Infinity;
  return lchoose(n, k) + k * Math.log(p) + (n - k) * Math.log1p(-p);
}

/** {@link binomialLpmf} with partials (∂k = 0, ∂n = 0, ∂p) written to out[offset … offset+2]. */
export function binomialLpmfGrad(
  k: number,
  n: number,
  p: number,
  out: Float64Array,
  offset: number,
): number {
  const v = binomialLpmf(k, n, p);
  if (fillNonFinite(v, out, offset, 3)) return v;
  out[offset] = 0;
  out[offset + 1] = 0;
  out[offset + 2] = p === 0 ? -n : p === 1 ? n : k / p - (n - k) / (1 - p);
  return v;
}

/**
 * Binomial log-mass with the success probability on the logit scale (p = logistic(η)), stable for
 * any finite η because it never forms p:
 *   log Binomial(k | n, logistic(η)) = log C(n, k) − k·softplus(−η) − (n − k)·softplus(η).
 * Partials: ∂k = 0, ∂n = 0, ∂η = k − n·logistic(η).
 *
 * Domains: n a non-negative integer; k an integer with 0 ≤ k ≤ n; η real.
 * Edges: any NaN → NaN; n negative, non-integer or infinite → NaN; k non-integer or outside 0…n →
 * −Infinity; η = +Infinity: k = n → 0, else −Infinity; η = −Infinity: k = 0 → 0, else −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: binomialLogitLpmf(3, 10, 0) = log(120/1024) ≈ −2.14398;
 * binomialLogitLpmf(10, 10, 800) = −10·e^(−800) → −0; binomialLogitLpmf(0, 10, 800) = −8000.
 */
export function binomialLogitLpmf(k: number, n: number, eta: number): number {
  if (!(n >= 0) || Math.floor(n) !== n || n === Infinity) return NaN;
  if (eta !== eta || k !== k) return NaN;
  if (k < 0 || k > n || Math.floor(k) !== k) return -Infinity;
  if (eta === Infinity) return k === n ? 0 : -Infinity;
  if (eta === -Infinity) return k === 0 ? 0 : -Infinity;
  return (
    lchoose(n, k) - (k === 0 ? 0 : k * softplus(-eta)) - (k === n ? 0 : (n - k) * softplus(eta))
  );
}

/** {@link binomialLogitLpmf} with partials (∂k = 0, ∂n = 0, ∂η) written to out[offset … offset+2]. */
export function binomialLogitLpmfGrad(
  k: number,
  n: number,
  eta: number,
  out: Float64Array,
  offset: number,
): number {
  const v = binomialLogitLpmf(k, n, eta);
  if (fillNonFinite(v, out, offset, 3)) return v;
  out[offset] = 0;
  out[offset + 1] = 0;
  // k − n·logistic(η) = k·logistic(−η) − (n − k)·logistic(η): the second form keeps full relative
  // accuracy when the two terms nearly cancel in the tails.
  out[offset + 2] = eta === Infinity || eta === -Infinity ? 0 : k * logistic(-eta) - (n - k) * logistic(eta);
  return v;
}
