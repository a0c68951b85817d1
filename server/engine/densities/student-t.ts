import { fillNonFinite } from './fill';
import { digamma, lgamma, LOG_PI } from './special';

/**
 * Student-t log-density (location–scale form), one observation:
 *   log t(y | ν, μ, σ) = lgamma((ν+1)/2) − lgamma(ν/2) − ½·log(νπ) − log σ − (ν+1)/2 · log1p(z²/ν),
 * with z = (y − μ)/σ.
 * Partials, with r = ν + z²:
 *   ∂y = −(ν+1)·z/(σ·r), ∂μ = −∂y, ∂σ = −1/σ + (ν+1)·z²/(σ·r),
 *   ∂ν = ½ψ((ν+1)/2) − ½ψ(ν/2) − 1/(2ν) − ½·log1p(z²/ν) + (ν+1)·z²/(2ν·r).
 *
 * Domains: y real; ν finite and > 0; μ finite; σ finite and > 0.
 * Edges: any NaN → NaN; ν ≤ 0 or ν = +Infinity → NaN; σ ≤ 0 or σ = +Infinity → NaN;
 * μ = ±Infinity → NaN; y = ±Infinity → −Infinity. Partials: NaN for a NaN value, 0 for −Infinity.
 * Examples: studentTLpdf(0, 1, 0, 1) = −log π (the Cauchy); studentTLpdf(0, 3, 0, 1) ≈ −1.00089
 * (= log(2/(π√3))); studentTLpdf(1, 0, 0, 1) = NaN.
 */
export function studentTLpdf(y: number, nu: number, mu: number, sigma: number): number {
  if (!(nu > 0) || nu === Infinity || !(sigma > 0) || sigma === Infinity) return NaN;
  if (!(mu - mu === 0) || y !== y) return NaN;
  if (y === Infinity || y === -Infinity) return -Infinity;
  const z = (y - mu) / sigma;
  return (
    lgamma(0.5 * (nu + 1)) -
    lgamma(0.5 * nu) -
    0.5 * (Math.log(nu) + LOG_PI) -
    Math.log(sigma) -
    0.5 * (nu + 1) * Math.log1p((z * z) / nu)
  );
}

/** {@link studentTLpdf} with partials (∂y, ∂ν, ∂μ, ∂σ) written to out[offset … offset+3]. */
export function studentTLpdfGrad(
  y: number,
  nu: number,
  mu: number,
  sigma: number,
  out: Float64Array,
  offset: number,
): number {
  const v = studentTLpdf(y, nu, mu, sigma);
  if (fillNonFinite(v, out, offset, 4)) return v;
  const z = (y - mu) / sigma;
  const z2 = z * z;
  const r = nu + z2;
  const dy = (-(nu + 1) * z) / (sigma * r);
  out[offset] = dy;
  out[offset + 1] =
    0.5 * (digamma(0.5 * (nu + 1)) - digamma(0.5 * nu)) -
    0.5 / nu -
    0.5 * Math.log1p(z2 / nu) +
    ((nu + 1) * z2) / (2 * nu * r);
  out[offset + 2] = -dy;
  out[offset + 3] = (-1 + ((nu + 1) * z2) / r) / sigma;
  return v;
}
