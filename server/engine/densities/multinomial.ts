import { lgamma } from './special';
import { SIMPLEX_TOLERANCE } from './simplex';

/**
 * Multinomial log-mass of one vector of counts k[kOff … kOff+K−1] with category probabilities
 * p[pOff … pOff+K−1], N = Σ kᵢ trials:
 *   log Mult(k | p) = lgamma(N + 1) − Σ lgamma(kᵢ + 1) + Σ kᵢ·log pᵢ   (terms with kᵢ = 0 are 0).
 * Partials (gradient layout: K partials in k, then K in p): ∂kᵢ = 0 (discrete), ∂pᵢ = kᵢ/pᵢ
 * (0 when kᵢ = 0). The p-partials are those of the formula in the ambient coordinates; a sampler
 * moving on the simplex uses their projection onto {Σ dpᵢ = 0}.
 *
 * Domains: K a positive integer; each kᵢ a non-negative integer; p on the simplex: 0 ≤ pᵢ ≤ 1 and
 * |Σ pᵢ − 1| ≤ SIMPLEX_TOLERANCE (1e-8).
 * Edges: K not a positive integer, any pᵢ outside [0, 1] or NaN, a sum of p off the simplex, or any
 * kᵢ NaN → NaN; any kᵢ negative, non-integer or infinite → −Infinity; pᵢ = 0 with kᵢ > 0 →
 * −Infinity. Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: k = [1, 2, 0], p = [0.2, 0.3, 0.5] → log(3 · 0.2 · 0.09) = log 0.054 ≈ −2.91877;
 * k = [3, 7], p = [0.4, 0.6] → binomialLpmf(3, 10, 0.4); k = [0, 0], any valid p → 0;
 * k = [1, 0], p = [0.5, 0.6] → NaN.
 */
export function multinomialLpmf(
  k: Float64Array,
  kOff: number,
  p: Float64Array,
  pOff: number,
  K: number,
): number {
  if (!(K >= 1) || Math.floor(K) !== K) return NaN;
  let sumP = 0;
  for (let i = 0; i < K; i++) {
    const pi = p[pOff + i];
    if (!(pi >= 0 && pi <= 1) || k[kOff + i] !== k[kOff + i]) return NaN;
    sumP += pi;
  }
  if (Math.abs(sumP - 1) > SIMPLEX_TOLERANCE) return NaN;
  let n = 0;
  let lp = 0;
  for (let i = 0; i < K; i++) {
    const ki = k[kOff + i];
    if (ki < 0 || Math.floor(ki) !== ki || ki === Infinity) return -Infinity;
    if (ki > 0) {
      const pi = p[pOff + i];
      if (pi === 0) return -Infinity;
      lp += ki * Math.log(pi) - lgamma(ki + 1);
      n += ki;
    }
  }
  return lp + lgamma(n + 1);
}

/**
 * {@link multinomialLpmf} with partials: out[outOff + i] = 0 (∂kᵢ) for i < K,
 * out[outOff + K + i] = ∂pᵢ.
 */
export function multinomialLpmfGrad(
  k: Float64Array,
  kOff: number,
  p: Float64Array,
  pOff: number,
  K: number,
  out: Float64Array,
  outOff: number,
): number {
  const v = multinomialLpmf(k, kOff, p, pOff, K);
  if (!(v - v === 0)) {
    const fill = v !== v ? NaN : 0;
    const n = K >= 1 && Math.floor(K) === K ? 2 * K : 0;
    for (let i = 0; i < n; i++) out[outOff + i] = fill;
    return v;
  }
  for (let i = 0; i < K; i++) {
    const ki = k[kOff + i];
    out[outOff + i] = 0;
    out[outOff + K + i] = ki === 0 ? 0 : ki / p[pOff + i];
  }
  return v;
}
