/**
 * Non-flat targets with closed-form moments: truncated normals, conjugate posteriors.
 */
import { describe, expect, it } from 'vitest';
import normal from '@stdlib/stats-base-dists-normal';
import { betaMoments, column, expectAllFeasible, expectMean, expectVariance, runChains } from './helpers';
import { betaBinomialTarget, bivariateNormalTarget, normalMeanTarget, orderedGroupsTarget, truncatedNormalTarget } from './targets';
import { mcseMean } from '../../../server/engine/diagnostics';

/**
 * Mean and variance of N(0, 1) truncated to [a, b] (
 * "Continuous Univariate Distributions", vol. 1 (2nd ed., Wiley 1994), §13.10.1):
 *   Z = Φ(b) − Φ(a), mean = (φ(a) − φ(b)) / Z, var = 1 + (a φ(a) − b φ(b)) / Z − mean².
 * Φ, φ from @stdlib/stats-base-dists-normal; Z computed on the side that avoids cancellation.
 */
function truncatedMoments(a: number, b: number): { mean: number; variance: number } {
  const phi = (x: number) => (Number.isFinite(x) ? normal.pdf(x, 0, 1) : 0);
  const xphi = (x: number) => (Number.isFinite(x) ? x * normal.pdf(x, 0, 1) : 0);
  const Z = a > 0 ? normal.cdf(-a, 0, 1) - normal.cdf(-b, 0, 1) : normal.cdf(b, 0, 1) - normal.cdf(a, 0, 1);
  const mean = (phi(a) - phi(b)) / Z;
  return { mean, variance: 1 + (xphi(a) - xphi(b)) / Z - mean * mean };
}

describe('standard normal truncated to [a, b]', () => {
  const cases: [number, number][] = [
    [-1, 1],
    [0.5, 2.5],
    [-0.3, Infinity],
    [-Infinity, 1.2],
    [4, Infinity], // far tail, one-sided
    [-7, -6], // far tail, two-sided
  ];
  it.each(cases)('RHMC on [%s, %s] matches the closed-form mean and variance', (a, b) => {
    const run = runChains(truncatedNormalTarget({ lo: a, hi: b }), 'rhmc', { warmup: 300, draws: 3000, seed: 31 });
    const { mean, variance } = truncatedMoments(a, b);
    expectMean(run, 0, mean);
    expectVariance(run, 0, mean, variance);
    expectAllFeasible(run);
  }, 30_000);
  it.each(cases)('hit-and-run (slice along chords) on [%s, %s] matches the closed form', (a, b) => {
    const run = runChains(truncatedNormalTarget({ lo: a, hi: b }), 'hitrun', { warmup: 300, draws: 3000, seed: 32 });
    const { mean, variance } = truncatedMoments(a, b);
    expectMean(run, 0, mean);
    expectVariance(run, 0, mean, variance);
    expectAllFeasible(run);
  }, 30_000);
  it('the closed form itself: N(0,1) truncated to [0, ∞) is the half-normal, mean √(2/π), variance 1 − 2/π (from memory)', () => {
    const { mean, variance } = truncatedMoments(0, Infinity);
    expect(mean).toBeCloseTo(Math.sqrt(2 / Math.PI), 12);
    expect(variance).toBeCloseTo(1 - 2 / Math.PI, 12);
  });
});

describe('conjugate posteriors ("Bayesian Data Analysis", 3rd ed., CRC Press 2013)', () => {
  it('normal mean with known variance and a normal prior: no inequalities, Euclidean HMC (BDA3 §2.5)', () => {
    const y = [4.1, 5.3, 3.8, 4.9, 5.6, 4.4];
    const sigma = 1.5;
    const mu0 = 0;
    const tau0 = 3;
    // BDA3 eq. (2.12): precision adds, mean is the precision-weighted average.
    const prec = 1 / tau0 ** 2 + y.length / sigma ** 2;
    const mean = (mu0 / tau0 ** 2 + y.reduce((s, v) => s + v, 0) / sigma ** 2) / prec;
    const run = runChains(normalMeanTarget({ y, sigma, mu0, tau0 }), 'rhmc', { warmup: 300, draws: 1500, seed: 41 });
    expect(run.p.m).toBe(0);
    expectMean(run, 0, mean);
    expectVariance(run, 0, mean, 1 / prec);
  }, 30_000);

  it.each(['rhmc', 'hitrun'] as const)('beta–binomial: Beta(α + y, β + N − y) posterior with %s (BDA3 §2.4)', (sampler) => {
    const args = { y: 7, N: 23, alpha: 2, beta: 3 };
    const { mean, variance } = betaMoments(args.alpha + args.y, args.beta + args.N - args.y);
    const run = runChains(betaBinomialTarget(args), sampler, { warmup: 300, draws: 1500, seed: 43 });
    expectMean(run, 0, mean);
    expectVariance(run, 0, mean, variance);
    expectAllFeasible(run);
  }, 30_000);
});

describe('no inequalities: Euclidean HMC with an adapted diagonal metric', () => {
  it('a correlated bivariate normal: marginal means and variances (definition of the distribution)', () => {
    const args = { m1: 1, m2: -2, s1: 1, s2: 3, r: 0.6 };
    const run = runChains(bivariateNormalTarget(args), 'rhmc', { warmup: 400, draws: 1500, seed: 47 });
    expect(run.p.m).toBe(0);
    expect(run.outs[0].factorizationsPerStep).toBe(0);
    expectMean(run, 0, args.m1);
    expectMean(run, 1, args.m2);
    expectVariance(run, 0, args.m1, args.s1 ** 2);
    expectVariance(run, 1, args.m2, args.s2 ** 2);
  }, 30_000);
});

describe('cross-check between the two samplers (internal consistency, not an external reference)', () => {
  it('ordered group means with a shared scale: RHMC and hit-and-run agree within 4 combined MCSE', () => {
    // Invented measurements of four river-sediment sites, means expected to rise downstream.
    const y = [
      [2.1, 2.9, 1.7, 2.5, 3.0, 2.2],
      [2.4, 2.0, 2.8, 1.9, 2.6, 2.3],
      [3.9, 4.4, 3.6, 4.1, 4.8, 3.7],
      [3.5, 4.0, 3.8, 4.6, 3.3, 4.2],
    ];
    const t = orderedGroupsTarget({ y });
    const a = runChains(t, 'rhmc', { warmup: 400, draws: 1000, seed: 8, chains: 3 });
    const b = runChains(t, 'hitrun', { warmup: 400, draws: 3000, seed: 9, chains: 3 });
    for (let j = 0; j < t.dim; j++) {
      const ca = column(a, j);
      const cb = column(b, j);
      const mean = (ch: Float64Array[]) => ch.reduce((s, c) => s + c.reduce((x, v) => x + v, 0), 0) / ch.reduce((s, c) => s + c.length, 0);
      expect(Math.abs(mean(ca) - mean(cb))).toBeLessThan(4 * Math.hypot(mcseMean(ca), mcseMean(cb)));
    }
    expectAllFeasible(a);
    expectAllFeasible(b);
  }, 60_000);
});
