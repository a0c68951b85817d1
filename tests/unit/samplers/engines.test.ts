/**
 * The baseline engines against closed-form answers: uniform simplex and order-simplex marginals, a
 * truncated normal, and (for the two HMC engines) a conjugate normal posterior. Fixed seeds;
 * tolerance 4 MCSE of the run itself (helpers.ts). Every returned draw passed the samplers' own
 * constraint check (makeDrawCheck) and is checked again here with expectAllFeasible.
 */
import { describe, expect, it } from 'vitest';
import normal from '@stdlib/stats-base-dists-normal';
import { betaMoments, expectAllFeasible, expectMean, expectVariance, runChains } from './helpers';
import { equalitySimplexTarget, normalMeanTarget, orderSimplexTarget, truncatedNormalTarget } from './targets';
import type { SamplerName } from '../../../server/engine/types';

/** Draws per chain (2 chains), warm-up 300: slow walks get more draws. */
const ENGINES: [SamplerName, number][] = [
  ['ball-walk', 2500],
  ['coord-hitrun', 2000],
  ['hitrun-plain', 2500],
  ['dikin-walk', 2500],
  ['rwm', 2500],
  ['transform-hmc', 1000],
  ['reflect-hmc', 1000],
];

/** Coordinates checked: first, middle and last (fewer simultaneous 4-MCSE checks per run). */
const some = (d: number) => [0, Math.floor(d / 2), d - 1];

describe.each(ENGINES)('%s', (engine, draws) => {
  it('uniform on the simplex {w ≥ 0, Σw = 1} with 6 parts: every part is Beta(1, 5)', () => {
    // Dirichlet(1, …, 1) aggregation property: each component of a uniform point on the K-part
    // simplex is Beta(1, K − 1) ("Continuous Multivariate Distributions",
    // vol. 1, 2nd ed., Wiley 2000, ch. 49).
    const K = 6;
    const run = runChains(equalitySimplexTarget(K), engine, { warmup: 300, draws, seed: 61 });
    const { mean, variance } = betaMoments(1, K - 1);
    for (const j of some(K)) {
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 30_000);

  it('uniform on the order simplex 0 ≤ x₁ ≤ … ≤ x₈ ≤ 1: x_k is Beta(k, n + 1 − k)', () => {
    // The k-th order statistic of n uniforms ("Order Statistics", 3rd ed., Wiley 2003, §2.1).
    const n = 8;
    const run = runChains(orderSimplexTarget(n), engine, { warmup: 300, draws, seed: 62 });
    for (const j of some(n)) {
      const { mean, variance } = betaMoments(j + 1, n - j);
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 30_000);

  it('standard normal truncated to [0.5, 2.5]: closed-form mean and variance', () => {
    // "Continuous Univariate Distributions", vol. 1, 2nd ed., Wiley 1994, §13.10.1:
    // Z = Φ(b) − Φ(a), mean = (φ(a) − φ(b))/Z, var = 1 + (aφ(a) − bφ(b))/Z − mean²
    // (Φ, φ from @stdlib/stats-base-dists-normal).
    const a = 0.5;
    const b = 2.5;
    const Z = normal.cdf(b, 0, 1) - normal.cdf(a, 0, 1);
    const mean = (normal.pdf(a, 0, 1) - normal.pdf(b, 0, 1)) / Z;
    const variance = 1 + (a * normal.pdf(a, 0, 1) - b * normal.pdf(b, 0, 1)) / Z - mean * mean;
    const run = runChains(truncatedNormalTarget({ lo: a, hi: b }), engine, { warmup: 300, draws: 2000, seed: 63 });
    expectMean(run, 0, mean);
    expectVariance(run, 0, mean, variance);
    expectAllFeasible(run);
  }, 30_000);
});

describe.each(['reflect-hmc', 'transform-hmc'] as const)('%s on a conjugate posterior', (engine) => {
  it('normal mean, known variance, normal prior (Bayesian Data Analysis, 3rd ed., §2.5, eq. 2.12)', () => {
    const y = [4.1, 5.3, 3.8, 4.9, 5.6, 4.4];
    const sigma = 1.5;
    const mu0 = 0;
    const tau0 = 3;
    const prec = 1 / tau0 ** 2 + y.length / sigma ** 2;
    const mean = (mu0 / tau0 ** 2 + y.reduce((s, v) => s + v, 0) / sigma ** 2) / prec;
    const run = runChains(normalMeanTarget({ y, sigma, mu0, tau0 }), engine, { warmup: 300, draws: 1500, seed: 64 });
    expectMean(run, 0, mean);
    expectVariance(run, 0, mean, 1 / prec);
  }, 30_000);
});

describe('every engine keeps the seed contract', () => {
  it.each(ENGINES.map(([e]) => e))('%s: same seed and chain ⇒ identical draws', (engine) => {
    const a = runChains(orderSimplexTarget(4), engine, { warmup: 30, draws: 40, seed: 5, chains: 1 });
    const b = runChains(orderSimplexTarget(4), engine, { warmup: 30, draws: 40, seed: 5, chains: 1 });
    expect(Array.from(a.outs[0].draws)).toEqual(Array.from(b.outs[0].draws));
  });
});
