import { describe, expect, it } from 'vitest';
import pdf from '@stdlib/stats-base-dists-normal-pdf';
import qnorm from '@stdlib/stats-base-dists-normal-quantile';
import { Rng } from '../../../server/engine/rng';
import {
  autocovariance,
  efmi,
  essBasic,
  essBulk,
  essMean,
  essTail,
  mcseMean,
  mcseQuantile,
  quantileSorted,
  rankNormalize,
  rhat,
  rhatBulk,
  splitChains,
} from '../../../server/engine/diagnostics';

/** Stationary Gaussian AR(1): x_t = ρ x_{t−1} + √(1−ρ²) ε_t, started from its stationary law. */
function ar1(rng: Rng, n: number, rho: number, shift = 0): Float64Array {
  const x = new Float64Array(n);
  const s = Math.sqrt(1 - rho * rho);
  let v = rng.normal();
  for (let i = 0; i < n; i++) {
    v = rho * v + s * rng.normal();
    x[i] = v + shift;
  }
  return x;
}

function meanSd(xs: number[]): { mean: number; sd: number; se: number } {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  const sd = Math.sqrt(xs.reduce((a, b) => a + (b - m) ** 2, 0) / (xs.length - 1));
  return { mean: m, sd, se: sd / Math.sqrt(xs.length) };
}

describe('autocovariance', () => {
  it('FFT result equals the direct biased sum (definition, "Practical Markov chain Monte Carlo", Statistical Science 1992)', () => {
    const rng = new Rng(7);
    for (const n of [5, 9, 100, 257]) {
      const x = ar1(rng, n, 0.6);
      const a = autocovariance(x);
      const m = x.reduce((s, v) => s + v, 0) / n;
      for (let t = 0; t < n; t++) {
        let s = 0;
        for (let i = 0; i + t < n; i++) s += (x[i] - m) * (x[i + t] - m);
        expect(a[t]).toBeCloseTo(s / n, 12);
      }
    }
  });
});

describe('splitting and rank normalisation (Improved R̂, Bayesian Analysis 2021, §4.1)', () => {
  it('drops the middle draw of an odd chain', () => {
    const [a, b] = splitChains([[1, 2, 3, 4, 5]]);
    expect(Array.from(a)).toEqual([1, 2]);
    expect(Array.from(b)).toEqual([4, 5]);
  });
  it('averages tied ranks and uses the offsets (r − 3/8)/(S + 1/4)', () => {
    const [z] = rankNormalize([[10, 20, 20, 30]]);
    // ranks 1, 2.5, 2.5, 4 of S = 4; quantiles computed independently with stdlib.
    expect(z[0]).toBeCloseTo(qnorm((1 - 0.375) / 4.25, 0, 1), 12);
    expect(z[1]).toBeCloseTo(qnorm((2.5 - 0.375) / 4.25, 0, 1), 12);
    expect(z[2]).toBe(z[1]);
    expect(z[3]).toBeCloseTo(qnorm((4 - 0.375) / 4.25, 0, 1), 12);
  });
  it('quantile definition 7 ("Sample quantiles in statistical packages", The American Statistician 1996): worked values', () => {
    const s = [1, 2, 3, 4];
    expect(quantileSorted(s, 0.5)).toBe(2.5); // h = 1.5
    expect(quantileSorted(s, 0.05)).toBeCloseTo(1.15, 12); // h = 0.15
    expect(quantileSorted(s, 1)).toBe(4);
  });
});

describe('ESS on AR(1) chains against ESS = N(1−ρ)/(1+ρ)', () => {
  // Source: the integrated autocorrelation time of a stationary AR(1) is τ = (1+ρ)/(1−ρ)
  // (common textbook result, e.g. "Practical Markov chain Monte Carlo", Statistical Science 1992, §3), so ESS = N/τ.
  // Tolerance: the estimator varies from run to run, so we repeat the experiment R = 20 times with
  // fixed seeds and require |mean of the estimates − N/τ| < 4 · (their standard error), the
  // standard error being measured from the replicates themselves.
  const R = 20;
  const chains = 4;
  const n = 2000;
  for (const rho of [0, 0.5, 0.9, -0.3]) {
    it(`ρ = ${rho}`, () => {
      const rng = new Rng(1000 + Math.round(rho * 100));
      const ests: number[] = [];
      for (let r = 0; r < R; r++) {
        const ch = Array.from({ length: chains }, () => ar1(rng, n, rho));
        ests.push(essMean(ch));
      }
      const truth = (chains * n * (1 - rho)) / (1 + rho);
      const { mean, se } = meanSd(ests);
      expect(Math.abs(mean - truth)).toBeLessThan(4 * se);
      // The bulk-ESS of a Gaussian chain is the ESS of a monotone transform of it: same target.
      const bulk = meanSd(
        Array.from({ length: 5 }, () =>
          essBulk(Array.from({ length: chains }, () => ar1(rng, n, rho))),
        ),
      );
      expect(Math.abs(bulk.mean - truth)).toBeLessThan(4 * Math.max(bulk.se, se));
    });
  }

  it('R̂ of well-mixed AR(1) chains is close to 1', () => {
    // Improved R̂, Bayesian Analysis 2021, §4.4: R̂ < 1.01 is expected once chains have mixed; with 4 × 2000
    // stationary draws at ρ = 0.5 (ESS ≈ 2700) the sampling spread of R̂ is far below 0.01.
    const rng = new Rng(31);
    const ch = Array.from({ length: 4 }, () => ar1(rng, 2000, 0.5));
    const r = rhat(ch);
    expect(r).toBeGreaterThan(0.99);
    expect(r).toBeLessThan(1.01);
  });
});

describe('R̂ (Improved R̂, Bayesian Analysis 2021)', () => {
  it('≈ 1 for iid normal chains', () => {
    const rng = new Rng(11);
    const ch = Array.from({ length: 4 }, () => ar1(rng, 1000, 0));
    expect(Math.abs(rhat(ch) - 1)).toBeLessThan(0.01);
    // iid draws: ESS ≈ the number of draws (τ = 1); checked against the run's own spread below.
    expect(essBulk(ch)).toBeGreaterThan(3000);
  });

  it('> 1.1 when one chain is shifted by one standard deviation', () => {
    const rng = new Rng(12);
    const ch = [ar1(rng, 1000, 0.3), ar1(rng, 1000, 0.3), ar1(rng, 1000, 0.3), ar1(rng, 1000, 0.3, 1)];
    expect(rhat(ch)).toBeGreaterThan(1.1);
  });

  it('> 1.1 when chains have the same mean but different scales (the folded R̂ catches it)', () => {
    // Improved R̂, Bayesian Analysis 2021, §4.2: the bulk R̂ misses a variance difference; the tail (folded) R̂ sees it.
    const rng = new Rng(13);
    const ch = [ar1(rng, 1000, 0), ar1(rng, 1000, 0), ar1(rng, 1000, 0), ar1(rng, 1000, 0).map((v) => 4 * v)];
    expect(rhat(ch)).toBeGreaterThan(1.1);
  });

  it('flags a trend inside each chain through splitting', () => {
    const rng = new Rng(14);
    const ch = Array.from({ length: 4 }, () => ar1(rng, 1000, 0).map((v, i) => v + (3 * i) / 1000));
    expect(rhat(ch)).toBeGreaterThan(1.1);
  });

  it('bulk R̂ and bulk-ESS are invariant to a monotone transform (rank based, §4.1)', () => {
    // The folded (tail) R̂ is not: folding about the median does not commute with exp().
    const rng = new Rng(15);
    const ch = Array.from({ length: 4 }, () => ar1(rng, 500, 0.7));
    const ex = ch.map((c) => c.map((v) => Math.exp(3 * v)));
    expect(rhatBulk(ex)).toBeCloseTo(rhatBulk(ch), 12);
    expect(essBulk(ex)).toBeCloseTo(essBulk(ch), 9);
  });
});

describe('MCSE', () => {
  it('of a quantile on iid normals matches √(p(1−p)/N)/φ(z_p)', () => {
    // Source: asymptotic normality of the sample p-quantile, sd = √(p(1−p)/N) / f(q_p)
    // ("Approximation Theorems of Mathematical Statistics", Wiley 1980, §2.3.3; from memory).
    // The MCSE estimator of Improved R̂ (Bayesian Analysis 2021, §4.4) is itself noisy (it reads a density off
    // order-statistic spacings), so we average R = 150 replicates and require the mean to be within
    // 4 standard errors (from the replicates) of the formula, and the empirical spread of the
    // quantile estimates across replicates to agree with the formula within 4 of its own standard
    // errors (sd of a sample sd ≈ sd/√(2(R−1)), normal theory).
    const R = 150;
    const chains = 4;
    const n = 500;
    const N = chains * n;
    const rng = new Rng(2024);
    for (const p of [0.05, 0.5, 0.95]) {
      const mcses: number[] = [];
      const qs: number[] = [];
      for (let r = 0; r < R; r++) {
        const ch = Array.from({ length: chains }, () => ar1(rng, n, 0));
        mcses.push(mcseQuantile(ch, p));
        const all = Float64Array.from(ch.flatMap((c) => Array.from(c))).sort();
        qs.push(quantileSorted(all, p));
      }
      const zp = qnorm(p, 0, 1);
      const truth = Math.sqrt((p * (1 - p)) / N) / pdf(zp, 0, 1);
      const m = meanSd(mcses);
      expect(Math.abs(m.mean - truth)).toBeLessThan(4 * m.se);
      const q = meanSd(qs);
      expect(Math.abs(q.sd - truth)).toBeLessThan((4 * truth) / Math.sqrt(2 * (R - 1)));
    }
  });

  it('of the mean on AR(1) chains matches σ/√ESS with ESS = N(1−ρ)/(1+ρ)', () => {
    // Same AR(1) source as above; tolerance 4 replicate standard errors.
    const rng = new Rng(77);
    const rho = 0.6;
    const vals = Array.from({ length: 20 }, () =>
      mcseMean(Array.from({ length: 4 }, () => ar1(rng, 1500, rho))),
    );
    const truth = Math.sqrt((1 + rho) / ((1 - rho) * 6000));
    const m = meanSd(vals);
    expect(Math.abs(m.mean - truth)).toBeLessThan(4 * m.se);
  });

  it('tail-ESS of iid draws is close to the number of draws', () => {
    // Indicators of iid draws are iid, so their ESS is N (definition); 4 replicate SEs.
    const rng = new Rng(78);
    const vals = Array.from({ length: 10 }, () =>
      essTail(Array.from({ length: 4 }, () => ar1(rng, 1000, 0))),
    );
    // tail-ESS is the smaller of two estimates, so it sits slightly below N: check within a
    // one-sided band of 4 SEs below and the estimates' own scatter above.
    const m = meanSd(vals);
    expect(m.mean).toBeLessThan(4000 + 4 * m.se);
    expect(m.mean).toBeGreaterThan(4000 - 4 * m.sd);
  });
});

describe('essBasic edge cases', () => {
  it('is NaN for constant draws', () => {
    expect(Number.isNaN(essBasic([new Float64Array(100).fill(2), new Float64Array(100).fill(2)]))).toBe(true);
  });
});

describe('E-FMI ("Diagnosing suboptimal cotangent disintegrations in Hamiltonian Monte Carlo", arXiv 2016)', () => {
  it('≈ 2 for independent energies and ≈ 2(1−ρ) for AR(1) energies', () => {
    // From the definition: E[(E_n − E_{n−1})²] = 2 Var(E)(1 − ρ₁) for a stationary series, so the
    // ratio tends to 2(1 − ρ). Tolerance: 4 replicate standard errors over 20 replicates.
    const rng = new Rng(99);
    for (const rho of [0, 0.8]) {
      const vals = Array.from({ length: 20 }, () => efmi(ar1(rng, 1000, rho)));
      const m = meanSd(vals);
      expect(Math.abs(m.mean - 2 * (1 - rho))).toBeLessThan(4 * m.se);
    }
  });
});
