/**
 * Scalar math functions of the model language with their derivatives.
 *
 * Convention (shared with the log-densities): `fGrad(x, …, out, offset)` returns f(x, …) and writes
 * the partial derivative with respect to each argument, in order, into out[offset], out[offset+1], …
 * Nothing allocates. Values follow IEEE semantics: NaN in gives NaN out.
 */
import { digamma, lgamma, logistic, logLogistic, softplus } from './special';

export { lgamma, logistic, logLogistic, softplus };

/**
 * exp(x); d/dx = exp(x).
 * Examples: exp(0) = 1 (d 1), exp(−Infinity) = 0 (d 0), exp(710) = +Infinity (overflow).
 */
export function expGrad(x: number, out: Float64Array, offset: number): number {
  const v = Math.exp(x);
  out[offset] = v;
  return v;
}

/**
 * log(x); d/dx = 1/x. Domain x ≥ 0.
 * Examples: log(1) = 0 (d 1), log(0) = −Infinity (d +Infinity), log(−1) = NaN (d NaN).
 */
export function logGrad(x: number, out: Float64Array, offset: number): number {
  out[offset] = x >= 0 ? 1 / x : NaN;
  return Math.log(x);
}

/**
 * log1p(x) = log(1 + x), accurate near 0; d/dx = 1/(1 + x). Domain x ≥ −1.
 * Examples: log1p(1e-20) = 1e-20 (d 1), log1p(−1) = −Infinity, log1p(−2) = NaN (d NaN).
 */
export function log1pGrad(x: number, out: Float64Array, offset: number): number {
  out[offset] = x >= -1 ? 1 / (1 + x) : NaN;
  return Math.log1p(x);
}

/**
 * expm1(x) = e^x − 1, accurate near 0; d/dx = e^x.
 * Examples: expm1(1e-20) = 1e-20 (d 1), expm1(−Infinity) = −1 (d 0).
 */
export function expm1Grad(x: number, out: Float64Array, offset: number): number {
  out[offset] = Math.exp(x);
  return Math.expm1(x);
}

/**
 * √x; d/dx = 1/(2√x). Domain x ≥ 0.
 * Examples: sqrt(4) = 2 (d 0.25), sqrt(0) = 0 (d +Infinity), sqrt(−1) = NaN (d NaN).
 */
export function sqrtGrad(x: number, out: Float64Array, offset: number): number {
  const v = Math.sqrt(x);
  out[offset] = 0.5 / v;
  return v;
}

/** x²; d/dx = 2x. Examples: square(−3) = 9 (d −6). */
export function square(x: number): number {
  return x * x;
}

/** x² with d/dx = 2x (see {@link square}). */
export function squareGrad(x: number, out: Float64Array, offset: number): number {
  out[offset] = 2 * x;
  return x * x;
}

/**
 * pow(x, y) = x^y with ∂/∂x = y·x^(y−1) and ∂/∂y = x^y·log x.
 *
 * Domain: x > 0 for all real y; x = 0 with y > 0 gives 0 (∂/∂x from the formula, e.g. 0 for y > 1,
 * ∂/∂y = 0); x < 0 is allowed for integer y (value from Math.pow, ∂/∂y = NaN because log x is
 * undefined); x < 0 with non-integer y gives NaN.
 * Examples: pow(2, 3) = 8 (∂x 12, ∂y 8·log 2); pow(0, 2) = 0 (∂x 0, ∂y 0); pow(−2, 2) = 4 (∂x −4,
 * ∂y NaN); pow(−2, 0.5) = NaN.
 */
export function powGrad(x: number, y: number, out: Float64Array, offset: number): number {
  const v = Math.pow(x, y);
  if (x === 0) {
    out[offset] = y === 0 ? 0 : y === 1 ? 1 : y * Math.pow(x, y - 1);
    out[offset + 1] = v === 0 ? 0 : NaN;
    return v;
  }
  out[offset] = y * Math.pow(x, y - 1);
  out[offset + 1] = x > 0 ? v * Math.log(x) : NaN;
  return v;
}

/**
 * |x|; d/dx = sign(x), with 0 at x = 0 (a subgradient).
 * Examples: abs(−2) = 2 (d −1), abs(0) = 0 (d 0).
 */
export function absGrad(x: number, out: Float64Array, offset: number): number {
  out[offset] = x > 0 ? 1 : x < 0 ? -1 : x === 0 ? 0 : NaN;
  return Math.abs(x);
}

/**
 * logistic(x) = 1/(1 + e^(−x)); d/dx = logistic(x)·logistic(−x), computed without cancellation.
 * Examples: logistic(0) = 0.5 (d 0.25), logistic(800) = 1 (d e^(−800) → 0).
 */
export function logisticGrad(x: number, out: Float64Array, offset: number): number {
  const v = logistic(x);
  out[offset] = v * logistic(-x);
  return v;
}

/**
 * log_logistic(x) = log logistic(x) = −softplus(−x); d/dx = logistic(−x).
 * Examples: log_logistic(0) = −log 2 (d 0.5), log_logistic(−800) = −800 (d 1),
 * log_logistic(800) = −0 (d e^(−800) → 0).
 */
export function logLogisticGrad(x: number, out: Float64Array, offset: number): number {
  out[offset] = logistic(-x);
  return logLogistic(x);
}

/**
 * softplus(x) = log(1 + e^x); d/dx = logistic(x).
 * Examples: softplus(0) = log 2 (d 0.5), softplus(800) = 800 (d 1), softplus(−800) → 0 (d → 0).
 */
export function softplusGrad(x: number, out: Float64Array, offset: number): number {
  out[offset] = logistic(x);
  return softplus(x);
}

/**
 * lgamma(x) = log|Γ(x)|; d/dx = ψ(x) (digamma).
 * Examples: lgamma(1) = 0 (d −γ ≈ −0.5772), lgamma(0) = +Infinity (d NaN).
 */
export function lgammaGrad(x: number, out: Float64Array, offset: number): number {
  out[offset] = digamma(x);
  return lgamma(x);
}

/**
 * log(e^a + e^b), stable: max + log1p(e^(−|a − b|)).
 * Examples: logSumExp2(0, 0) = log 2; logSumExp2(1000, 1000) = 1000 + log 2;
 * logSumExp2(−Infinity, 3) = 3; logSumExp2(−Infinity, −Infinity) = −Infinity.
 */
export function logSumExp2(a: number, b: number): number {
  const m = a > b ? a : b;
  if (m === -Infinity || m === Infinity) return m === m ? m : NaN;
  return m + Math.log1p(Math.exp(-Math.abs(a - b)));
}

/**
 * logSumExp2 with partials ∂/∂a = e^(a − v) = logistic(a − b), ∂/∂b = logistic(b − a) (the two
 * softmax weights, computed from the difference so they keep full relative accuracy).
 * When both are −Infinity (or either is +Infinity) the value is ±Infinity and the partials are 0.
 */
export function logSumExp2Grad(a: number, b: number, out: Float64Array, offset: number): number {
  const v = logSumExp2(a, b);
  if (v === Infinity || v === -Infinity || v !== v) {
    out[offset] = v !== v ? NaN : 0;
    out[offset + 1] = v !== v ? NaN : 0;
    return v;
  }
  out[offset] = logistic(a - b);
  out[offset + 1] = logistic(b - a);
  return v;
}

/**
 * log Σᵢ exp(x[off + i]) for i = 0 … n−1, stable: m + log Σ exp(xᵢ − m) with m = max xᵢ.
 *
 * Edges: n = 0 gives −Infinity (empty sum); all entries −Infinity gives −Infinity; any +Infinity
 * gives +Infinity; any NaN gives NaN.
 * Examples: x = [0, 0, 0] → log 3; x = [1000, 1000] → 1000 + log 2; x = [−1000, 0] → ≈ 0.
 */
export function logSumExp(x: Float64Array, off: number, n: number): number {
  let m = -Infinity;
  for (let i = 0; i < n; i++) {
    const xi = x[off + i];
    if (xi !== xi) return NaN;
    if (xi > m) m = xi;
  }
  if (m === -Infinity || m === Infinity) return m;
  let s = 0;
  for (let i = 0; i < n; i++) s += Math.exp(x[off + i] - m);
  return m + Math.log(s);
}

/**
 * {@link logSumExp} with the softmax gradient out[outOff + i] = exp(xᵢ − m) / Σⱼ exp(xⱼ − m)
 * (m = max xⱼ; computed from the sum rather than from the rounded value, so the weights keep full
 * relative accuracy and sum to 1 within rounding).
 * When the value is ±Infinity the partials are 0; when it is NaN they are NaN.
 */
export function logSumExpGrad(
  x: Float64Array,
  off: number,
  n: number,
  out: Float64Array,
  outOff: number,
): number {
  let m = -Infinity;
  let nan = false;
  for (let i = 0; i < n; i++) {
    const xi = x[off + i];
    if (xi !== xi) nan = true;
    else if (xi > m) m = xi;
  }
  if (nan || m === -Infinity || m === Infinity) {
    const fill = nan ? NaN : 0;
    for (let i = 0; i < n; i++) out[outOff + i] = fill;
    return nan ? NaN : m;
  }
  let s = 0;
  for (let i = 0; i < n; i++) {
    const e = Math.exp(x[off + i] - m);
    out[outOff + i] = e;
    s += e;
  }
  const inv = 1 / s;
  for (let i = 0; i < n; i++) out[outOff + i] *= inv;
  return m + Math.log(s);
}
