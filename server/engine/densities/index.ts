/**
 * Scalar log-densities and math functions with their partial derivatives, for the code the model
 * compiler generates (called once per data row; small, allocation-free, inlinable).
 *
 * Contract
 * - `xLpdf(y, p1, p2, …): number` — log density (or mass) of ONE observation with all normalising
 *   constants. Outside the support: −Infinity. Invalid parameters (scale ≤ 0, NaN, …): NaN.
 * - `xLpdfGrad(y, p1, p2, …, out, offset): number` — same value; writes ∂/∂y, ∂/∂p1, ∂/∂p2, … (in
 *   argument order) into out[offset …]. Discrete arguments (counts, trials, 0/1) get partial 0.
 *   Partials are NaN when the value is NaN and 0 when the value is ±Infinity.
 * - Vector densities (dirichlet, multinomial):
 *   `xLpdf(x: Float64Array, xOff, param: Float64Array, pOff, K)` and
 *   `xLpdfGrad(x, xOff, param, pOff, K, out, outOff)` writing K partials for x then K for param.
 * - Math: `fGrad(x, out, offset)` returns f(x) and writes f′(x) to out[offset]; `powGrad(x, y,
 *   out, offset)` writes ∂x, ∂y; `logSumExp(x, off, n)` / `logSumExpGrad(x, off, n, out, outOff)`.
 * Each function's doc comment gives its formula, domains, edge cases and examples.
 */
export { normalLpdf, normalLpdfGrad } from './normal';
export { studentTLpdf, studentTLpdfGrad } from './student-t';
export { cauchyLpdf, cauchyLpdfGrad } from './cauchy';
export { laplaceLpdf, laplaceLpdfGrad } from './laplace';
export { logisticLpdf, logisticLpdfGrad } from './logistic';
export { lognormalLpdf, lognormalLpdfGrad } from './lognormal';
export { gammaLpdf, gammaLpdfGrad } from './gamma';
export { exponentialLpdf, exponentialLpdfGrad } from './exponential';
export { betaLpdf, betaLpdfGrad } from './beta';
export { halfnormalLpdf, halfnormalLpdfGrad } from './halfnormal';
export { poissonLpmf, poissonLpmfGrad, poissonLogLpmf, poissonLogLpmfGrad } from './poisson';
export { binomialLpmf, binomialLpmfGrad, binomialLogitLpmf, binomialLogitLpmfGrad } from './binomial';
export { bernoulliLpmf, bernoulliLpmfGrad, bernoulliLogitLpmf, bernoulliLogitLpmfGrad } from './bernoulli';
export { dirichletLpdf, dirichletLpdfGrad } from './dirichlet';
export { multinomialLpmf, multinomialLpmfGrad } from './multinomial';
export { SIMPLEX_TOLERANCE } from './simplex';
export {
  expGrad,
  logGrad,
  log1pGrad,
  expm1Grad,
  sqrtGrad,
  square,
  squareGrad,
  powGrad,
  absGrad,
  logisticGrad,
  logLogisticGrad,
  softplusGrad,
  lgammaGrad,
  logSumExp,
  logSumExpGrad,
  logSumExp2,
  logSumExp2Grad,
} from './math';
export {
  lgamma,
  digamma,
  lbeta,
  lchoose,
  logistic,
  logLogistic,
  softplus,
  LOG_2PI,
  HALF_LOG_2PI,
  LOG_PI,
  LN2,
} from './special';
export { DENSITY_TABLE, FUSED_DENSITY_TABLE, MATH_TABLE } from './table';
export type { DensityArg, DensityInfo, FusedDensityInfo, ScalarDensityInfo, VectorDensityInfo, MathFunctionInfo } from './table';
