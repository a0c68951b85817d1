/**
 * PSIS-LOO against exact leave-one-out on a conjugate normal model, and the Pareto shape fit
 * against samples of a known generalized Pareto distribution.
 *
 * Model: y_i ~ N(θ, σ²) with σ known, prior θ ~ N(μ0, τ0²). The posterior given any subset of the
 * data is normal, and the leave-one-out predictive density of y_i is
 *   N(y_i | μ_−i, σ² + τ_−i²),  1/τ_−i² = 1/τ0² + (n − 1)/σ²,  μ_−i = τ_−i² (μ0/τ0² + Σ_{j≠i} y_j/σ²)
 * (normal model with known variance, "Bayesian Data Analysis", 3rd ed., section 2.5). The draws
 * are INDEPENDENT draws from the exact conjugate posterior (no MCMC), so r_eff = 1.
 */
import { describe, expect, it } from 'vitest';
import stdNormalLogpdf from '@stdlib/stats-base-dists-normal-logpdf';
import { gpdFit, gpdQuantile, nthSmallest, psisLoo } from '../../../server/engine/predictive/psis';
import { Rng } from '../../../server/engine/rng';

const lnorm = stdNormalLogpdf as (x: number, m: number, s: number) => number;

function conjugate(y: number[], sigma: number, mu0: number, tau0: number, S: number, seed: number) {
  const n = y.length;
  const sum = y.reduce((a, b) => a + b, 0);
  const prec = 1 / (tau0 * tau0) + n / (sigma * sigma);
  const mean = (mu0 / (tau0 * tau0) + sum / (sigma * sigma)) / prec;
  const rng = new Rng(seed);
  const ll = new Float64Array(S * n);
  for (let s = 0; s < S; s++) {
    const theta = mean + rng.normal() / Math.sqrt(prec);
    for (let i = 0; i < n; i++) ll[s * n + i] = lnorm(y[i], theta, sigma); // stdlib normal logpdf
  }
  const precLoo = 1 / (tau0 * tau0) + (n - 1) / (sigma * sigma);
  const exact = y.map((yi) => {
    const m = (mu0 / (tau0 * tau0) + (sum - yi) / (sigma * sigma)) / precLoo;
    return lnorm(yi, m, Math.sqrt(sigma * sigma + 1 / precLoo));
  });
  return { ll, exact };
}

function data(n: number, seed: number): number[] {
  const r = new Rng(seed);
  return Array.from({ length: n }, () => 1 + r.normal());
}

describe('PSIS-LOO on a conjugate normal model (exact posterior draws)', () => {
  it('matches the exact leave-one-out elpd within 4 MCSE, row by row and in total', () => {
    const y = data(30, 5);
    const S = 4000;
    const { ll, exact } = conjugate(y, 1, 0, 10, S, 77);
    const loo = psisLoo(ll, S, y.length);
    const exactTotal = exact.reduce((a, b) => a + b, 0);
    expect(Math.abs(loo.elpd - exactTotal)).toBeLessThan(4 * loo.mcse);
    loo.rows.forEach((r, i) => expect(Math.abs(r.elpd - exact[i])).toBeLessThan(4 * r.mcse));
    expect(loo.highK).toEqual([]);
    // one unknown: the effective number of parameters is about 1 (the 2017 paper's p_loo ≈ p for
    // a well-specified model with a weak prior; common practice)
    expect(loo.pLoo).toBeGreaterThan(0.7);
    expect(loo.pLoo).toBeLessThan(1.3);
    expect(loo.se).toBeGreaterThan(0);
  });

  it('flags an influential outlier row with k̂ > 0.7, and only that row', () => {
    const y = data(12, 9);
    y[4] = 9; // eight standard deviations away
    const S = 4000;
    const { ll, exact } = conjugate(y, 1, 0, 10, S, 78);
    const loo = psisLoo(ll, S, y.length);
    expect(loo.highK).toEqual([4]);
    expect(loo.rows[4].k).toBeGreaterThan(0.7);
    // the other rows stay estimable and agree with exact leave-one-out
    loo.rows.forEach((r, i) => {
      if (i !== 4) expect(Math.abs(r.elpd - exact[i])).toBeLessThan(4 * r.mcse);
    });
  });
});

describe('generalized Pareto fit (Technometrics 2009 method)', () => {
  it.each([0.2, 0.5, 0.9])('recovers the shape k = %f of simulated exceedances', (k) => {
    const n = 2000;
    const rng = new Rng(31);
    const x = Array.from({ length: n }, () => gpdQuantile(rng.uniform(), k, 1.5)).sort((a, b) => a - b);
    const fit = gpdFit(x, false);
    // asymptotic sd of an efficient shape estimate: (1 + k)/√n (inverse Fisher information of the
    // generalized Pareto, common practice)
    expect(Math.abs(fit.k - k)).toBeLessThan((4 * (1 + k)) / Math.sqrt(n));
    // relative sd of the scale estimate: √(2(1 + k)/n) (same source)
    expect(Math.abs(fit.sigma / 1.5 - 1)).toBeLessThan(4 * Math.sqrt((2 * (1 + k)) / n));
  });
});

describe('order statistic used to find the tail', () => {
  it('equals the element of a full sort, with ties and any position', () => {
    const rng = new Rng(4);
    for (let rep = 0; rep < 200; rep++) {
      const n = 1 + rng.int(500);
      const x = Float64Array.from({ length: n }, () => (rng.uniform() < 0.3 ? rng.int(5) : rng.normal()));
      const k = rng.int(n);
      // reference: JavaScript's built-in typed-array sort
      expect(nthSmallest(Float64Array.from(x), k)).toBe(Float64Array.from(x).sort()[k]);
    }
  });
});
