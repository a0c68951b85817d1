/**
 * Random generators for every scalar observation density of the language, for replicated data.
 *
 * Each generator draws one value of the density's FIRST argument (the observation) given the
 * remaining arguments, in exactly the parameterisation of the log-density with the same language
 * name in server/engine/densities (e.g. ld_gamma is shape–rate, ld_student_t is ν, location,
 * scale). The variates come from the registry's @stdlib/random-base-* algorithms, fed with our own
 * seeded stream (`prng: () => rng.uniform()`), so replicates are reproducible from a run's seed.
 *
 * Domains follow the densities: invalid parameters (a scale ≤ 0, a probability outside [0, 1], a
 * non-integer number of trials, …) give NaN, as the log-density does.
 *
 * Not covered: ld_dirichlet and ld_multinomial (whole-vector densities).
 *
 * Binomial is the exception: @stdlib/random-base-binomial 0.2.2's fast path (n·p ≥ 10) is biased
 * (at n = 40, p = 0.45 its mean is 18.51 against 18 and its variance 8.8 against 9.9 over 200,000
 * draws), so binomial variates come from `binomialBySplitting` below, built on the Beta generator.
 */
import stdNormal from '@stdlib/random-base-normal';
import stdT from '@stdlib/random-base-t';
import stdCauchy from '@stdlib/random-base-cauchy';
import stdLaplace from '@stdlib/random-base-laplace';
import stdLogistic from '@stdlib/random-base-logistic';
import stdLognormal from '@stdlib/random-base-lognormal';
import stdGamma from '@stdlib/random-base-gamma';
import stdExponential from '@stdlib/random-base-exponential';
import stdBeta from '@stdlib/random-base-beta';
import stdPoisson from '@stdlib/random-base-poisson';
import stdBernoulli from '@stdlib/random-base-bernoulli';
import type { Rng } from '../rng';

/** Draws one observation given the density's parameters (its arguments after the first). */
export type Generator = (...params: number[]) => number;

const finite = (x: number) => x - x === 0;
const posFinite = (x: number) => x > 0 && x !== Infinity;
const wholeNonNeg = (x: number) => x >= 0 && x !== Infinity && Math.floor(x) === x;

/**
 * Binomial(n, p), exactly, by splitting on order statistics (The Art of Computer Programming,
 * vol. 2, §3.4.1; recalled from memory): the a-th smallest of n uniforms is Beta(a, n + 1 − a); if it
 * lies at or above p, the count below p is Binomial(a − 1, p / X), else it is a plus
 * Binomial(n − a, (p − X) / (1 − X)). Once n is small the rest is inverted by sequential search on
 * the pmf's recursion f(j + 1) = f(j) · (n − j)/(j + 1) · p/q. About log₂(n) Beta draws per variate.
 */
export function binomialBySplitting(n: number, p: number, uniform: () => number, beta: (a: number, b: number) => number): number {
  let k = 0;
  while (n > 32 && p > 0 && p < 1) {
    const a = 1 + Math.floor(n / 2);
    const b = n + 1 - a;
    const x = beta(a, b);
    if (x >= p) {
      n = a - 1;
      p = p / x;
    } else {
      k += a;
      n = b - 1;
      p = (p - x) / (1 - x);
    }
  }
  if (!(p > 0)) return k;
  if (p >= 1) return k + n;
  if (p > 0.5) return k + n - invertSmallBinomial(n, 1 - p, uniform);
  return k + invertSmallBinomial(n, p, uniform);
}

function invertSmallBinomial(n: number, p: number, uniform: () => number): number {
  const ratio = p / (1 - p);
  let f = Math.pow(1 - p, n);
  let u = uniform();
  let j = 0;
  while (u > f && j < n) {
    u -= f;
    f *= ((n - j) / (j + 1)) * ratio;
    j++;
  }
  return j;
}

/**
 * The generators of one uniform stream, keyed by the language name of the log-density they
 * invert. `uniform` must return independent uniforms on [0, 1).
 */
export function makeGenerators(uniform: () => number): Readonly<Record<string, Generator>> {
  const opts = { prng: uniform as never };
  const normal = stdNormal.factory(opts) as (mu: number, sigma: number) => number;
  const t = stdT.factory(opts) as (nu: number) => number;
  const cauchy = stdCauchy.factory(opts) as (x0: number, gamma: number) => number;
  const laplace = stdLaplace.factory(opts) as (mu: number, b: number) => number;
  const logisticRv = stdLogistic.factory(opts) as (mu: number, s: number) => number;
  const lognormal = stdLognormal.factory(opts) as (mu: number, sigma: number) => number;
  const gamma = stdGamma.factory(opts) as (shape: number, rate: number) => number;
  const exponential = stdExponential.factory(opts) as (rate: number) => number;
  const beta = stdBeta.factory(opts) as (a: number, b: number) => number;
  const poisson = stdPoisson.factory(opts) as (lambda: number) => number;
  const binomial = (n: number, p: number) => binomialBySplitting(n, p, uniform, beta);
  const bernoulli = stdBernoulli.factory(opts) as (p: number) => number;

  const loc = (f: (m: number, s: number) => number) => (m: number, s: number) => (finite(m) && posFinite(s) ? f(m, s) : NaN);
  const pois = (lambda: number) => (!(lambda >= 0) || lambda === Infinity ? NaN : lambda === 0 ? 0 : poisson(lambda));
  const binom = (n: number, p: number) => {
    if (!wholeNonNeg(n) || !(p >= 0 && p <= 1)) return NaN;
    if (n === 0 || p === 0) return 0;
    if (p === 1) return n;
    return binomial(n, p);
  };
  const bern = (p: number) => (!(p >= 0 && p <= 1) ? NaN : p === 0 ? 0 : p === 1 ? 1 : bernoulli(p));
  const g: Record<string, Generator> = {
    // N(μ, σ)
    ld_normal: loc(normal),
    // μ + σ·T, T standard Student t with ν degrees of freedom
    ld_student_t: (nu: number, mu: number, sigma: number) => (posFinite(nu) && finite(mu) && posFinite(sigma) ? mu + sigma * t(nu) : NaN),
    ld_cauchy: loc(cauchy),
    ld_laplace: loc(laplace),
    ld_logistic: loc(logisticRv),
    // exp(N(μ, σ))
    ld_lognormal: loc(lognormal),
    // shape α, rate β (mean α/β)
    ld_gamma: (shape: number, rate: number) => (posFinite(shape) && posFinite(rate) ? gamma(shape, rate) : NaN),
    // rate λ (mean 1/λ)
    ld_exponential: (rate: number) => (posFinite(rate) ? exponential(rate) : NaN),
    ld_beta: (a: number, b: number) => (posFinite(a) && posFinite(b) ? beta(a, b) : NaN),
    // |N(0, σ)|
    ld_halfnormal: (sigma: number) => (posFinite(sigma) ? Math.abs(normal(0, sigma)) : NaN),
    ld_poisson: pois,
    ld_binomial: binom,
    ld_bernoulli: bern,
  };
  return Object.freeze(Object.assign(Object.create(null) as Record<string, Generator>, g));
}

const cache = new WeakMap<Rng, Readonly<Record<string, Generator>>>();

/** The generators fed by a seeded stream (made once per stream). */
export function generatorsFor(rng: Rng): Readonly<Record<string, Generator>> {
  let g = cache.get(rng);
  if (!g) {
    g = makeGenerators(() => rng.uniform());
    cache.set(rng, g);
  }
  return g;
}

/** Language names of the densities that can be replicated. */
export const REPLICABLE_DENSITIES: ReadonlySet<string> = new Set(Object.keys(makeGenerators(Math.random)));
