/**
 * Uniform distributions on polytopes with closed-form marginals.
 */
import { describe, expect, it } from 'vitest';
import { betaMoments, expectAllFeasible, expectMean, expectVariance, runChains } from './helpers';
import { equalitySimplexTarget, orderSimplexTarget, uniformSimplexTarget } from './targets';

describe('uniform on the standard simplex', () => {
  // Uniform on {x ∈ ℝ^d : x ≥ 0, Σx ≤ 1} is Dirichlet(1, …, 1) on d + 1 components (with the slack
  // 1 − Σx); by the aggregation property each coordinate is Beta(1, d)
  // ("Continuous Multivariate Distributions", vol. 1 (2nd ed., Wiley 2000), ch. 49).
  // Hit-and-run keeps one draw per n line moves and still mixes slowly into the simplex's corners,
  // so it needs many more (cheap) draws than RHMC for the variance to settle: the squared deviations
  // are strongly skewed and their MCSE is only trustworthy with a large effective sample. At d = 50
  // hit-and-run's corner excursions make the variance's MCSE unreliable within a test's budget
  // (measured: z-scores with sd ≈ 2 over 200 checks), so d = 50 is checked with RHMC only and
  // hit-and-run's d = 50 figures are recorded by the benchmark.
  it.each([
    ['rhmc', 10, 200, 300],
    ['hitrun', 10, 500, 20000],
    ['rhmc', 50, 150, 400],
  ] as const)('%s, d = %i: every coordinate has the Beta(1, d) mean and variance', (sampler, d, warmup, draws) => {
    const run = runChains(uniformSimplexTarget(d), sampler, { warmup, draws, seed: 101 + d });
    const { mean, variance } = betaMoments(1, d);
    for (let j = 0; j < d; j++) {
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);

  it('the same simplex given as an equality Σx = 1 over d + 1 components matches Beta(1, d)', () => {
    const d = 10;
    const run = runChains(equalitySimplexTarget(d + 1), 'rhmc', { warmup: 200, draws: 300, seed: 7 });
    expect(run.p.n).toBe(d);
    const { mean, variance } = betaMoments(1, d);
    for (let j = 0; j < d + 1; j++) {
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);
});

describe('uniform on the order simplex 0 ≤ x₁ ≤ … ≤ xₙ ≤ 1', () => {
  // x_k is the k-th order statistic of n uniforms: Beta(k, n + 1 − k)
  // ("Order Statistics" (3rd ed., Wiley 2003), §2.1).
  // RHMC: 1000 draws per chain (cheap with the banded metric); at 300 the variance's MCSE of the
  // skewed squared deviations is itself unreliable.
  it.each([
    ['rhmc', 200, 1000],
    ['hitrun', 500, 10000],
  ] as const)('%s, n = 20: x_k matches Beta(k, n + 1 − k)', (sampler, warmup, draws) => {
    const n = 20;
    const run = runChains(orderSimplexTarget(n), sampler, { warmup, draws, seed: 2026 });
    for (let k = 1; k <= n; k++) {
      const { mean, variance } = betaMoments(k, n + 1 - k);
      expectMean(run, k - 1, mean);
      expectVariance(run, k - 1, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);
});
