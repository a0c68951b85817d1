import { digamma, lgamma } from './special';
import { SIMPLEX_TOLERANCE } from './simplex';

/**
 * Dirichlet log-density of one point x of the (K−1)-simplex, read from x[xOff … xOff+K−1], with
 * concentrations alpha[aOff … aOff+K−1]:
 *   log Dir(x | α) = lgamma(Σα) − Σ lgamma(αᵢ) + Σ (αᵢ − 1)·log xᵢ.
 * Partials (gradient layout: K partials in x, then K in α):
 *   ∂xᵢ = (αᵢ − 1)/xᵢ, ∂αᵢ = ψ(Σα) − ψ(αᵢ) + log xᵢ.
 * The x-partials are those of the formula in the ambient coordinates; a sampler moving on the
 * simplex uses their projection onto {Σ dxᵢ = 0}.
 *
 * Domains: K a positive integer; every αᵢ finite and > 0; x on the simplex: 0 ≤ xᵢ ≤ 1 and
 * |Σ xᵢ − 1| ≤ SIMPLEX_TOLERANCE (1e-8).
 * Edges: K not a positive integer, any αᵢ ≤ 0, infinite or NaN, or any xᵢ NaN → NaN; any xᵢ < 0,
 * xᵢ > 1 or a sum off the simplex → −Infinity. A coordinate xᵢ = 0 contributes 0 when αᵢ = 1,
 * +Infinity when αᵢ < 1 and −Infinity when αᵢ > 1 (−Infinity wins over +Infinity); on such edges
 * the partials are reported as 0. Partials: NaN for a NaN value, 0 for ±Infinity.
 * Examples: x = [0.2, 0.3, 0.5], α = [1, 1, 1] → log 2 (uniform on the 2-simplex: density 2!);
 * x = [0.25, 0.75], α = [2, 3] → same as betaLpdf(0.25, 2, 3) ≈ 0.52325;
 * x = [0.5, 0.6], α = [1, 1] → −Infinity; α = [0, 1] → NaN.
 */
export function dirichletLpdf(
  x: Float64Array,
  xOff: number,
  alpha: Float64Array,
  aOff: number,
  K: number,
): number {
  if (!(K >= 1) || Math.floor(K) !== K) return NaN;
  let sumA = 0;
  let sumX = 0;
  for (let i = 0; i < K; i++) {
    const a = alpha[aOff + i];
    const xi = x[xOff + i];
    if (!(a > 0) || a === Infinity || xi !== xi) return NaN;
    sumA += a;
    sumX += xi;
  }
  if (Math.abs(sumX - 1) > SIMPLEX_TOLERANCE) return -Infinity;
  let lp = lgamma(sumA);
  let edge = 0; // +1 when some coordinate gives +Infinity
  for (let i = 0; i < K; i++) {
    const a = alpha[aOff + i];
    const xi = x[xOff + i];
    if (xi < 0 || xi > 1) return -Infinity;
    lp -= lgamma(a);
    if (xi === 0) {
      if (a > 1) return -Infinity;
      if (a < 1) edge = 1;
    } else if (a !== 1) {
      lp += (a - 1) * Math.log(xi);
    }
  }
  return edge === 1 ? Infinity : lp;
}

/**
 * {@link dirichletLpdf} with partials: out[outOff + i] = ∂xᵢ for i < K, out[outOff + K + i] = ∂αᵢ.
 */
export function dirichletLpdfGrad(
  x: Float64Array,
  xOff: number,
  alpha: Float64Array,
  aOff: number,
  K: number,
  out: Float64Array,
  outOff: number,
): number {
  const v = dirichletLpdf(x, xOff, alpha, aOff, K);
  let edge = !(v - v === 0);
  if (!edge) {
    for (let i = 0; i < K; i++) if (x[xOff + i] === 0) edge = true;
  }
  if (edge) {
    const fill = v !== v ? NaN : 0;
    const n = K >= 1 && Math.floor(K) === K ? 2 * K : 0;
    for (let i = 0; i < n; i++) out[outOff + i] = fill;
    return v;
  }
  let sumA = 0;
  for (let i = 0; i < K; i++) sumA += alpha[aOff + i];
  const psiSum = digamma(sumA);
  for (let i = 0; i < K; i++) {
    const a = alpha[aOff + i];
    const xi = x[xOff + i];
    out[outOff + i] = (a - 1) / xi;
    out[outOff + K + i] = psiSum - digamma(a) + Math.log(xi);
  }
  return v;
}
