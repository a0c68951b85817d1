/**
 * Every replicate generator against its distribution, at fixed seeds:
 *  - moments: sample mean and variance against the closed-form mean and variance (formulas from
 *    the reference library's own mean/variance for the family, or the textbook values named beside
 *    each), within 4 Monte Carlo standard errors of the sample itself;
 *  - continuous families: the Kolmogorov–Smirnov distance to the reference library's CDF below the
 *    asymptotic critical value at level 0.001 (1.949/√n, the Kolmogorov distribution's quantile,
 *    common practice);
 *  - discrete families: Pearson's chi-square over cells with expected counts ≥ 5 (tails pooled),
 *    below the chi-square quantile at level 0.001 (jStat's chisquare.inv).
 * Reference CDFs: @stdlib/stats-base-dists-normal (cdf), @stdlib/stats-base-dists-logistic-cdf,
 * @stdlib/stats-base-dists-poisson-logpmf (Poisson pmf) and jStat (npm `jstat`) for the other
 * families.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import stdNormal from '@stdlib/stats-base-dists-normal';
import stdLogisticCdf from '@stdlib/stats-base-dists-logistic-cdf';
import stdPoissonLogpmf from '@stdlib/stats-base-dists-poisson-logpmf';
import { generatorsFor, makeGenerators, REPLICABLE_DENSITIES } from '../../../server/engine/predictive/generators';
import { DENSITY_TABLE } from '../../../server/engine/densities';
import { Rng } from '../../../server/engine/rng';

type F = (...a: number[]) => number;
const jStat = (createRequire(import.meta.url)('jstat') as { jStat: Record<string, Record<string, F>> }).jStat;

const N = 20000;
const KS_CRIT = 1.949 / Math.sqrt(N); // Kolmogorov distribution, level 0.001 (common practice)

function sample(name: string, params: number[], seed: number): Float64Array {
  const g = generatorsFor(new Rng(seed))[name];
  const out = new Float64Array(N);
  for (let i = 0; i < N; i++) out[i] = g(...params);
  return out;
}

function ksDistance(x: Float64Array, cdf: (v: number) => number): number {
  const s = Float64Array.from(x).sort();
  let d = 0;
  for (let i = 0; i < s.length; i++) {
    const f = cdf(s[i]);
    d = Math.max(d, (i + 1) / s.length - f, f - i / s.length);
  }
  return d;
}

/** Sample mean and variance with their Monte Carlo standard errors. */
function moments(x: Float64Array) {
  const n = x.length;
  let m = 0;
  for (const v of x) m += v;
  m /= n;
  let m2 = 0;
  let m4 = 0;
  for (const v of x) {
    const d = (v - m) * (v - m);
    m2 += d;
    m4 += d * d;
  }
  const variance = m2 / (n - 1);
  m4 /= n;
  return { mean: m, variance, seMean: Math.sqrt(variance / n), seVar: Math.sqrt(Math.max(m4 - variance * variance, 0) / n) };
}

function expectMoments(x: Float64Array, mean: number, variance: number) {
  const s = moments(x);
  expect(Math.abs(s.mean - mean)).toBeLessThan(4 * s.seMean);
  expect(Math.abs(s.variance - variance)).toBeLessThan(4 * s.seVar);
}

function chiSquare(x: Float64Array, pmf: (k: number) => number, kMax: number): { stat: number; crit: number } {
  const counts = new Map<number, number>();
  for (const v of x) counts.set(v, (counts.get(v) ?? 0) + 1);
  // Cells 0…kMax with pooled tails so every expected count is ≥ 5.
  const cells: { obs: number; exp: number }[] = [];
  let obs = 0;
  let exp = 0;
  let seen = 0;
  for (let k = 0; k <= kMax; k++) {
    obs += counts.get(k) ?? 0;
    seen += counts.get(k) ?? 0;
    exp += N * pmf(k);
    if (exp >= 5) {
      cells.push({ obs, exp });
      obs = 0;
      exp = 0;
    }
  }
  // remaining mass (k beyond the last closed cell) into one cell
  const rest = { obs: obs + (N - seen), exp: 0 };
  rest.exp = N - cells.reduce((s, c) => s + c.exp, 0);
  if (rest.exp >= 5) cells.push(rest);
  else {
    cells[cells.length - 1].obs += rest.obs;
    cells[cells.length - 1].exp += rest.exp;
  }
  let stat = 0;
  for (const c of cells) stat += ((c.obs - c.exp) * (c.obs - c.exp)) / c.exp;
  return { stat, crit: jStat.chisquare.inv(0.999, cells.length - 1) };
}

describe('replicate generators', () => {
  it('cover every scalar log-density of the language', () => {
    const scalar = Object.values(DENSITY_TABLE).filter((d) => d.kind === 'scalar').map((d) => d.name);
    for (const n of scalar) expect(REPLICABLE_DENSITIES.has(n)).toBe(true);
  });

  it('are reproducible from the seed and follow the supplied uniform stream', () => {
    expect(sample('ld_gamma', [2, 3], 11)).toEqual(sample('ld_gamma', [2, 3], 11));
    expect(sample('ld_gamma', [2, 3], 11)).not.toEqual(sample('ld_gamma', [2, 3], 12));
    const r = new Rng(5);
    const a = makeGenerators(() => r.uniform()).ld_normal(0, 1);
    const r2 = new Rng(5);
    expect(makeGenerators(() => r2.uniform()).ld_normal(0, 1)).toBe(a);
  });

  it('give NaN for invalid parameters, as the log-densities do', () => {
    const g = generatorsFor(new Rng(1));
    expect(g.ld_normal(0, 0)).toBeNaN();
    expect(g.ld_gamma(-1, 1)).toBeNaN();
    expect(g.ld_binomial(2.5, 0.5)).toBeNaN();
    expect(g.ld_bernoulli(1.5)).toBeNaN();
    expect(g.ld_poisson(-1)).toBeNaN();
    expect(g.ld_binomial(7, 1)).toBe(7);
    expect(g.ld_poisson(0)).toBe(0);
  });

  // Continuous families: [name, params, reference CDF (source), mean, variance (source)].
  const normalCdf = stdNormal.cdf as F;
  const continuous: [string, number[], (x: number) => number, number, number][] = [
    // stdlib normal cdf; mean μ, variance σ²
    ['ld_normal', [1.5, 2], (x) => normalCdf(x, 1.5, 2), 1.5, 4],
    // jStat studentt (standardised); mean μ, variance σ²·ν/(ν − 2) (textbook, ν > 2)
    ['ld_student_t', [5, -1, 0.5], (x) => jStat.studentt.cdf((x + 1) / 0.5, 5), -1, 0.25 * (5 / 3)],
    // jStat cauchy: no moments, KS only
    ['ld_cauchy', [2, 0.7], (x) => jStat.cauchy.cdf(x, 2, 0.7), NaN, NaN],
    // jStat laplace; mean μ, variance 2b²
    ['ld_laplace', [-3, 1.2], (x) => jStat.laplace.cdf(x, -3, 1.2), -3, 2 * 1.44],
    // stdlib logistic cdf; mean μ, variance s²π²/3
    ['ld_logistic', [0.5, 2], (x) => (stdLogisticCdf as F)(x, 0.5, 2), 0.5, (4 * Math.PI * Math.PI) / 3],
    // jStat lognormal; mean e^(μ+σ²/2), variance (e^(σ²) − 1)e^(2μ+σ²)
    ['ld_lognormal', [0.2, 0.4], (x) => jStat.lognormal.cdf(x, 0.2, 0.4), Math.exp(0.2 + 0.08), (Math.exp(0.16) - 1) * Math.exp(0.4 + 0.16)],
    // jStat gamma takes (shape, SCALE): scale = 1/rate; mean α/β, variance α/β²
    ['ld_gamma', [2.5, 4], (x) => jStat.gamma.cdf(x, 2.5, 1 / 4), 2.5 / 4, 2.5 / 16],
    ['ld_gamma', [0.3, 1], (x) => jStat.gamma.cdf(x, 0.3, 1), 0.3, 0.3],
    // jStat exponential (rate); mean 1/λ, variance 1/λ²
    ['ld_exponential', [3], (x) => jStat.exponential.cdf(x, 3), 1 / 3, 1 / 9],
    // jStat beta; mean a/(a+b), variance ab/((a+b)²(a+b+1))
    ['ld_beta', [2, 5], (x) => jStat.beta.cdf(x, 2, 5), 2 / 7, 10 / (49 * 8)],
    // half-normal through the identity F(x) = 2Φ(x/σ) − 1 with stdlib's normal cdf;
    // mean σ√(2/π), variance σ²(1 − 2/π)
    ['ld_halfnormal', [1.7], (x) => 2 * normalCdf(x / 1.7, 0, 1) - 1, 1.7 * Math.sqrt(2 / Math.PI), 1.7 * 1.7 * (1 - 2 / Math.PI)],
  ];
  it.each(continuous.map((c, i) => [c[0], c[1].join(', '), i]))('%s(%s): KS and moments', (_n, _p, i) => {
    const [name, params, cdf, mean, variance] = continuous[i as number];
    const x = sample(name, params, 1000 + (i as number));
    expect(ksDistance(x, cdf)).toBeLessThan(KS_CRIT);
    if (Number.isFinite(mean)) expectMoments(x, mean, variance);
  });

  // Discrete families: [name, params, reference pmf (source), kMax, mean, variance (textbook)].
  const discrete: [string, number[], (k: number) => number, number, number, number][] = [
    // stdlib Poisson log-pmf (jStat's pmf overflows for large rates)
    ['ld_poisson', [3.2], (k) => Math.exp((stdPoissonLogpmf as F)(k, 3.2)), 40, 3.2, 3.2],
    ['ld_poisson', [250], (k) => Math.exp((stdPoissonLogpmf as F)(k, 250)), 500, 250, 250],
    ['ld_binomial', [12, 0.3], (k) => jStat.binomial.pdf(k, 12, 0.3), 12, 3.6, 12 * 0.3 * 0.7],
    ['ld_binomial', [400, 0.55], (k) => jStat.binomial.pdf(k, 400, 0.55), 400, 220, 400 * 0.55 * 0.45],
    // n·p ≥ 10 and p < ½: the case where @stdlib/random-base-binomial 0.2.2 is biased (see generators.ts)
    ['ld_binomial', [40, 0.45], (k) => jStat.binomial.pdf(k, 40, 0.45), 40, 18, 40 * 0.45 * 0.55],
    ['ld_bernoulli', [0.35], (k) => (k === 1 ? 0.35 : k === 0 ? 0.65 : 0), 1, 0.35, 0.35 * 0.65],
  ];
  it.each(discrete.map((c, i) => [c[0], c[1].join(', '), i]))('%s(%s): chi-square and moments', (_n, _p, i) => {
    const [name, params, pmf, kMax, mean, variance] = discrete[i as number];
    const x = sample(name, params, 2000 + (i as number));
    expect(x.every((v) => Number.isInteger(v))).toBe(true);
    const { stat, crit } = chiSquare(x, pmf, kMax);
    expect(stat).toBeLessThan(crit);
    expectMoments(x, mean, variance);
  });
});
