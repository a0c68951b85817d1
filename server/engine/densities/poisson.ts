import { fillNonFinite } from './fill';
import { lgamma } from './special';

/**
 * Poisson log-mass, one count:
 *   log Poisson(k | λ) = k·log λ − λ − lgamma(k + 1).
 * Partials: ∂k = 0 (k is discrete), ∂λ = k/λ − 1.
 *
 * Domains: k a non-negative integer; λ finite and ≥ 0.
 * Edges: any NaN → NaN; λ < 0 or λ = +Infinity → NaN; k negative, non-integer or +Infinity →
 * −Infinity; λ = 0: k = 0 → 0 (∂λ = −1, one-sided), k > 0 → −Infinity.
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: poissonLpmf(0, 2) = −2; poissonLpmf(3, 2) = 3·log 2 − 2 − log 6 ≈ −1.71232;
 * poissonLpmf(1.5, 2) = −Infinity; poissonLpmf(2, −1) = NaN.
 */
export function poissonLpmf(k: number, lambda: number): number {
  if (!(lambda >= 0) || lambda === Infinity || k !== k) return NaN;
  if (k < 0 || Math.floor(k) !== k || k === Infinity) return -Infinity;
  if (lambda === 0) return k === 0 ? 0 : -Infinity;
  return (k === 0 ? 0 : k * Math.log(lambda)) - lambda - lgamma(k + 1);
}

/** {@link poissonLpmf} with partials (∂k = 0, ∂λ) written to out[offset … offset+1]. */
export function poissonLpmfGrad(k: number, lambda: number, out: Float64Array, offset: number): number {
  const v = poissonLpmf(k, lambda);
  if (fillNonFinite(v, out, offset, 2)) return v;
  out[offset] = 0;
  out[offset + 1] = k === 0 ? -1 : k / lambda - 1;
  return v;
}

/**
 * Poisson log-mass with a log-rate η (λ = e^η), one count, without forming λ's logarithm:
 *   log Poisson(k | e^η) = k·η − e^η − lgamma(k + 1).
 * Partials: ∂k = 0, ∂η = k − e^η.
 *
 * Domains: k a non-negative integer; η real (−Infinity allowed: λ = 0).
 * Edges: any NaN → NaN; η = +Infinity → NaN; k negative, non-integer or +Infinity → −Infinity;
 * η = −Infinity: k = 0 → 0 (∂η = 0), k > 0 → −Infinity. For η > ~709.78, e^η overflows and the
 * value is −Infinity (the true value is below −1e300).
 * Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: poissonLogLpmf(0, 0) = −1; poissonLogLpmf(3, log 2) = poissonLpmf(3, 2) ≈ −1.71232;
 * poissonLogLpmf(2, −700) ≈ −1400.693 (finite where λ itself underflows to ~1e−304).
 */
export function poissonLogLpmf(k: number, eta: number): number {
  if (eta !== eta || eta === Infinity || k !== k) return NaN;
  if (k < 0 || Math.floor(k) !== k || k === Infinity) return -Infinity;
  if (eta === -Infinity) return k === 0 ? 0 : -Infinity;
  return (k === 0 ? 0 : k * eta) - Math.exp(eta) - lgamma(k + 1);
}

/** {@link poissonLogLpmf} with partials (∂k = 0, ∂η) written to out[offset … offset+1]. */
export function poissonLogLpmfGrad(k: number, eta: number, out: Float64Array, offset: number): number {
  const v = poissonLogLpmf(k, eta);
  if (fillNonFinite(v, out, offset, 2)) return v;
  out[offset] = 0;
  out[offset + 1] = k - Math.exp(eta);
  return v;
}
