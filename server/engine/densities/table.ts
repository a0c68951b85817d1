/**
 * What the compiler needs to know about each log-density and math function: the language name,
 * the exported function names (value and value-with-partials), the argument names in order, which
 * arguments are discrete (their partial is always 0) and the support of the first argument.
 */
import * as bernoulli from './bernoulli';
import * as beta from './beta';
import * as binomial from './binomial';
import * as cauchy from './cauchy';
import * as dirichlet from './dirichlet';
import * as exponential from './exponential';
import * as gamma from './gamma';
import * as halfnormal from './halfnormal';
import * as laplace from './laplace';
import * as logistic from './logistic';
import * as lognormal from './lognormal';
import * as math from './math';
import * as multinomial from './multinomial';
import * as normal from './normal';
import * as poisson from './poisson';
import * as studentT from './student-t';

export interface DensityArg {
  name: string;
  /** Counts, trials, 0/1 outcomes: the partial with respect to this argument is always 0. */
  discrete: boolean;
}

/** A log-density of one scalar observation: value(y, p1, …) and grad(y, p1, …, out, offset). */
export interface ScalarDensityInfo {
  kind: 'scalar';
  /** Name in the model language, e.g. "ld_normal". */
  name: string;
  /** Exported names in this module, e.g. "normalLpdf" and "normalLpdfGrad". */
  valueFn: string;
  gradFn: string;
  value: (...args: number[]) => number;
  grad: (...args: never[]) => number;
  args: readonly DensityArg[];
  /** Support of the first argument, in words. */
  support: string;
}

/**
 * A log-density of one vector observation of length K:
 *   value(x, xOff, param, pOff, K) and grad(x, xOff, param, pOff, K, out, outOff),
 * where grad writes K partials for x then K partials for param.
 */
export interface VectorDensityInfo {
  kind: 'vector';
  name: string;
  valueFn: string;
  gradFn: string;
  value: (x: Float64Array, xOff: number, param: Float64Array, pOff: number, K: number) => number;
  grad: (
    x: Float64Array,
    xOff: number,
    param: Float64Array,
    pOff: number,
    K: number,
    out: Float64Array,
    outOff: number,
  ) => number;
  args: readonly DensityArg[];
  support: string;
}

export type DensityInfo = ScalarDensityInfo | VectorDensityInfo;

const c = (name: string): DensityArg => ({ name, discrete: false });
const d = (name: string): DensityArg => ({ name, discrete: true });

function scalar(
  name: string,
  valueFn: string,
  value: (...args: number[]) => number,
  grad: (...args: never[]) => number,
  args: DensityArg[],
  support: string,
): ScalarDensityInfo {
  return { kind: 'scalar', name, valueFn, gradFn: `${valueFn}Grad`, value, grad, args, support };
}

/** Every log-density of the language, keyed by its language name. */
export const DENSITY_TABLE: Readonly<Record<string, DensityInfo>> = Object.freeze({
  ld_normal: scalar('ld_normal', 'normalLpdf', normal.normalLpdf, normal.normalLpdfGrad, [c('y'), c('mu'), c('sigma')], 'y real'),
  ld_student_t: scalar('ld_student_t', 'studentTLpdf', studentT.studentTLpdf, studentT.studentTLpdfGrad, [c('y'), c('nu'), c('mu'), c('sigma')], 'y real'),
  ld_cauchy: scalar('ld_cauchy', 'cauchyLpdf', cauchy.cauchyLpdf, cauchy.cauchyLpdfGrad, [c('y'), c('loc'), c('scale')], 'y real'),
  ld_laplace: scalar('ld_laplace', 'laplaceLpdf', laplace.laplaceLpdf, laplace.laplaceLpdfGrad, [c('y'), c('loc'), c('scale')], 'y real'),
  ld_logistic: scalar('ld_logistic', 'logisticLpdf', logistic.logisticLpdf, logistic.logisticLpdfGrad, [c('y'), c('loc'), c('scale')], 'y real'),
  ld_lognormal: scalar('ld_lognormal', 'lognormalLpdf', lognormal.lognormalLpdf, lognormal.lognormalLpdfGrad, [c('y'), c('mu'), c('sigma')], 'y > 0'),
  ld_gamma: scalar('ld_gamma', 'gammaLpdf', gamma.gammaLpdf, gamma.gammaLpdfGrad, [c('y'), c('shape'), c('rate')], 'y ≥ 0'),
  ld_exponential: scalar('ld_exponential', 'exponentialLpdf', exponential.exponentialLpdf, exponential.exponentialLpdfGrad, [c('y'), c('rate')], 'y ≥ 0'),
  ld_beta: scalar('ld_beta', 'betaLpdf', beta.betaLpdf, beta.betaLpdfGrad, [c('y'), c('a'), c('b')], '0 ≤ y ≤ 1'),
  ld_halfnormal: scalar('ld_halfnormal', 'halfnormalLpdf', halfnormal.halfnormalLpdf, halfnormal.halfnormalLpdfGrad, [c('y'), c('sigma')], 'y ≥ 0'),
  ld_poisson: scalar('ld_poisson', 'poissonLpmf', poisson.poissonLpmf, poisson.poissonLpmfGrad, [d('k'), c('rate')], 'k = 0, 1, 2, …'),
  ld_binomial: scalar('ld_binomial', 'binomialLpmf', binomial.binomialLpmf, binomial.binomialLpmfGrad, [d('k'), d('n'), c('p')], 'k = 0, 1, …, n'),
  ld_bernoulli: scalar('ld_bernoulli', 'bernoulliLpmf', bernoulli.bernoulliLpmf, bernoulli.bernoulliLpmfGrad, [d('y'), c('p')], 'y ∈ {0, 1}'),
  ld_dirichlet: {
    kind: 'vector',
    name: 'ld_dirichlet',
    valueFn: 'dirichletLpdf',
    gradFn: 'dirichletLpdfGrad',
    value: dirichlet.dirichletLpdf,
    grad: dirichlet.dirichletLpdfGrad,
    args: [c('w'), c('alpha')],
    support: 'w on the simplex (wᵢ ≥ 0, Σ wᵢ = 1)',
  },
  ld_multinomial: {
    kind: 'vector',
    name: 'ld_multinomial',
    valueFn: 'multinomialLpmf',
    gradFn: 'multinomialLpmfGrad',
    value: multinomial.multinomialLpmf,
    grad: multinomial.multinomialLpmfGrad,
    args: [d('counts'), c('p')],
    support: 'counts = non-negative integers',
  },
} satisfies Record<string, DensityInfo>);

/**
 * A density whose parameter is written through a link function — `ld_binomial(k, n, logistic(η))`,
 * `ld_bernoulli(y, logistic(η))`, `ld_poisson(k, exp(η))` — is compiled to a kernel that takes η
 * itself and never forms the probability or the rate, so it stays finite and accurate for any η
 * (the plain composition rounds logistic(40) to 1 and gives −∞ for a failure; exp(800) overflows).
 * The compiler's fusion pass (compile/fuse.ts) rewrites such a call to the fused entry's `name`,
 * an internal key that user text cannot spell (it contains `∘`).
 */
export interface FusedDensityInfo extends ScalarDensityInfo {
  /** The language's density, e.g. "ld_binomial". */
  base: string;
  /** The link function that is absorbed, e.g. "logistic". */
  link: 'logistic' | 'exp';
  /** Position of the linked argument (0-based). */
  linkArg: number;
}

function fused(
  base: string,
  link: 'logistic' | 'exp',
  linkArg: number,
  valueFn: string,
  value: (...args: number[]) => number,
  grad: (...args: never[]) => number,
  args: DensityArg[],
  support: string,
): FusedDensityInfo {
  return { ...scalar(`${base}∘${link}`, valueFn, value, grad, args, support), base, link, linkArg };
}

/** The fused kernels, keyed by their internal names. */
export const FUSED_DENSITY_TABLE: Readonly<Record<string, FusedDensityInfo>> = Object.freeze({
  'ld_binomial∘logistic': fused('ld_binomial', 'logistic', 2, 'binomialLogitLpmf', binomial.binomialLogitLpmf, binomial.binomialLogitLpmfGrad, [d('k'), d('n'), c('eta')], 'k = 0, 1, …, n'),
  'ld_bernoulli∘logistic': fused('ld_bernoulli', 'logistic', 1, 'bernoulliLogitLpmf', bernoulli.bernoulliLogitLpmf, bernoulli.bernoulliLogitLpmfGrad, [d('y'), c('eta')], 'y ∈ {0, 1}'),
  'ld_poisson∘exp': fused('ld_poisson', 'exp', 1, 'poissonLogLpmf', poisson.poissonLogLpmf, poisson.poissonLogLpmfGrad, [d('k'), c('eta')], 'k = 0, 1, 2, …'),
} satisfies Record<string, FusedDensityInfo>);

/**
 * Elementwise math functions: value(x[, y]) and grad(x[, y], out, offset) writing one partial
 * per argument. log_sum_exp is the vector function {@link math.logSumExp}/{@link math.logSumExpGrad}.
 */
export interface MathFunctionInfo {
  name: string;
  arity: 1 | 2;
  valueFn: string;
  gradFn: string;
  value: (...args: number[]) => number;
  grad: (...args: never[]) => number;
}

function m1(name: string, valueFn: string, value: (x: number) => number, grad: (x: number, out: Float64Array, offset: number) => number): MathFunctionInfo {
  return { name, arity: 1, valueFn, gradFn: `${valueFn}Grad`, value, grad };
}

export const MATH_TABLE: Readonly<Record<string, MathFunctionInfo>> = Object.freeze({
  exp: m1('exp', 'exp', Math.exp, math.expGrad),
  log: m1('log', 'log', Math.log, math.logGrad),
  log1p: m1('log1p', 'log1p', Math.log1p, math.log1pGrad),
  expm1: m1('expm1', 'expm1', Math.expm1, math.expm1Grad),
  sqrt: m1('sqrt', 'sqrt', Math.sqrt, math.sqrtGrad),
  square: m1('square', 'square', math.square, math.squareGrad),
  abs: m1('abs', 'abs', Math.abs, math.absGrad),
  logistic: m1('logistic', 'logistic', math.logistic, math.logisticGrad),
  log_logistic: m1('log_logistic', 'logLogistic', math.logLogistic, math.logLogisticGrad),
  softplus: m1('softplus', 'softplus', math.softplus, math.softplusGrad),
  lgamma: m1('lgamma', 'lgamma', math.lgamma, math.lgammaGrad),
  pow: { name: 'pow', arity: 2, valueFn: 'pow', gradFn: 'powGrad', value: Math.pow, grad: math.powGrad },
} satisfies Record<string, MathFunctionInfo>);
