/**
 * Special functions shared by the log-densities: log-gamma, digamma, log-beta, log-binomial
 * coefficient, and the numerically stable logistic family (logistic, softplus, log-logistic).
 *
 * log-gamma, digamma and log-beta come from the stdlib packages (@stdlib/math-base-special-gammaln,
 * -digamma, -betaln); the rest are short closed forms written here.
 */
import gammaln from '@stdlib/math-base-special-gammaln';
import digammaFn from '@stdlib/math-base-special-digamma';
import betaln from '@stdlib/math-base-special-betaln';

/** log(2π). */
export const LOG_2PI = 1.8378770664093453;
/** ½·log(2π). */
export const HALF_LOG_2PI = 0.9189385332046727;
/** log(π). */
export const LOG_PI = 1.1447298858494002;
/** log(2). */
export const LN2 = 0.6931471805599453;

/**
 * Natural logarithm of the absolute value of the gamma function, log|Γ(x)|.
 *
 * Domain: all reals. Poles (x = 0, −1, −2, …) give +Infinity; NaN gives NaN.
 * Examples: lgamma(1) = 0, lgamma(0.5) = ½·log(π) ≈ 0.5724, lgamma(10) = log(9!) ≈ 12.8018,
 * lgamma(0) = +Infinity.
 */
export function lgamma(x: number): number {
  return gammaln(x);
}

/**
 * Digamma function ψ(x) = d/dx log Γ(x).
 *
 * Domain: all reals except the poles 0, −1, −2, … (NaN there); NaN gives NaN.
 * Examples: ψ(1) = −γ ≈ −0.5772, ψ(0.5) = −γ − 2·log 2 ≈ −1.9635, ψ(2) = 1 − γ.
 */
export function digamma(x: number): number {
  return digammaFn(x);
}

/**
 * log B(a, b) = log Γ(a) + log Γ(b) − log Γ(a + b), computed without cancellation for large
 * arguments.
 *
 * Domain: a > 0, b > 0. a or b < 0 or NaN gives NaN; a = 0 or b = 0 gives +Infinity.
 * Examples: lbeta(1, 1) = 0, lbeta(2, 3) = log(1/12) ≈ −2.4849.
 */
export function lbeta(a: number, b: number): number {
  return betaln(a, b);
}

/**
 * log C(n, k) = log Γ(n + 1) − log Γ(k + 1) − log Γ(n − k + 1).
 *
 * Domain: integers 0 ≤ k ≤ n (callers check); k = 0 or k = n gives exactly 0.
 * Examples: lchoose(5, 2) = log 10, lchoose(7, 0) = 0.
 */
export function lchoose(n: number, k: number): number {
  if (k === 0 || k === n) return 0;
  if (k === 1 || k === n - 1) return Math.log(n);
  return -Math.log(n + 1) - betaln(n - k + 1, k + 1);
}

/**
 * Logistic (inverse logit) function 1 / (1 + e^(−x)), evaluated without overflow.
 *
 * Domain: all reals. logistic(±Infinity) = 1 / 0; NaN gives NaN.
 * Examples: logistic(0) = 0.5, logistic(800) = 1, logistic(−800) = e^(−800) → 0 (underflow).
 */
export function logistic(x: number): number {
  if (x >= 0) return 1 / (1 + Math.exp(-x));
  const e = Math.exp(x);
  return e / (1 + e);
}

/**
 * Softplus log(1 + e^x), stable for large |x|: max(x, 0) + log1p(e^(−|x|)).
 *
 * Domain: all reals. softplus(+Infinity) = +Infinity, softplus(−Infinity) = 0; NaN gives NaN.
 * Examples: softplus(0) = log 2, softplus(800) = 800, softplus(−800) = e^(−800) → 0.
 */
export function softplus(x: number): number {
  return (x > 0 ? x : 0) + Math.log1p(Math.exp(-Math.abs(x)));
}

/**
 * log of the logistic function, log(1 / (1 + e^(−x))) = −softplus(−x), stable for large |x|.
 *
 * Domain: all reals. logLogistic(+Infinity) = 0, logLogistic(−Infinity) = −Infinity; NaN gives NaN.
 * Examples: logLogistic(0) = −log 2, logLogistic(800) = −e^(−800) → −0, logLogistic(−800) = −800.
 */
export function logLogistic(x: number): number {
  return -softplus(-x);
}
