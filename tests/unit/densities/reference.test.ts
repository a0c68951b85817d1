/**
 * Every log-density against general-purpose reference libraries from the npm registry, at many
 * points including the edges of the support. Sources are named beside each check:
 *   - stdlib (@stdlib/stats-base-dists-*-logpdf / -logpmf / -pmf / -cdf packages),
 *   - jStat (npm `jstat`), whose densities are computed on the probability scale (logged here,
 *     only where the density does not underflow).
 * Where neither library has the family (half-normal, dirichlet, multinomial, logistic density) the
 * check goes through a textbook identity with a library density, named beside it.
 */
import { describe, expect, it } from 'vitest';
import stdNormal from '@stdlib/stats-base-dists-normal-logpdf';
import stdT from '@stdlib/stats-base-dists-t-logpdf';
import stdCauchy from '@stdlib/stats-base-dists-cauchy-logpdf';
import stdLognormal from '@stdlib/stats-base-dists-lognormal-logpdf';
import stdGamma from '@stdlib/stats-base-dists-gamma-logpdf';
import stdExponential from '@stdlib/stats-base-dists-exponential-logpdf';
import stdBeta from '@stdlib/stats-base-dists-beta-logpdf';
import stdPoisson from '@stdlib/stats-base-dists-poisson-logpmf';
import stdBinomial from '@stdlib/stats-base-dists-binomial-logpmf';
import stdBernoulliPmf from '@stdlib/stats-base-dists-bernoulli-pmf';
import stdLogisticCdf from '@stdlib/stats-base-dists-logistic-cdf';
import * as D from '../../../server/engine/densities';
import { expectClose, jStat } from './helpers';

const REL = 1e-12; // stdlib and our code evaluate the same closed forms in double precision
// jStat evaluates densities on the probability scale (logged here) through its own gamma-function
// approximations (a six-term Lanczos series for log Γ, accuracy about 2e-10 as published with the
// series in "Numerical Recipes", 2nd ed., Cambridge University Press 1992; from memory); measured agreement is about 1e-8 or better, 1e-7 is the margin.
const REL_JSTAT = 1e-7;

/** log of a jStat density where it does not underflow, otherwise undefined (no comparison). */
function logOf(p: number): number | undefined {
  return p > 1e-280 && Number.isFinite(p) ? Math.log(p) : undefined;
}

const Y = [-50, -3, -1, -0.1, 0, 0.5, 2, 7.5, 40];
const LOC = [-2, 0, 3.3];
const SCALE = [1e-3, 0.2, 1, 4.5, 1e3];

describe('location–scale families', () => {
  it('normal: stdlib normal-logpdf and jStat.normal.pdf', () => {
    let n = 0;
    for (const y of Y)
      for (const mu of LOC)
        for (const s of SCALE) {
          const v = D.normalLpdf(y, mu, s);
          expectClose(v, stdNormal(y, mu, s), REL, `normal(${y}|${mu},${s}) vs stdlib`);
          const j = logOf(jStat.normal.pdf(y, mu, s));
          if (j !== undefined) expectClose(v, j, REL_JSTAT, `normal vs jStat`), n++;
        }
    expect(n).toBeGreaterThan(50);
  });

  it('student_t: stdlib t-logpdf (standard t, shifted and scaled: log t_ν((y−μ)/σ) − log σ) and jStat.studentt.pdf', () => {
    for (const y of Y)
      for (const nu of [0.5, 1, 2.5, 7, 30, 1e4])
        for (const mu of LOC)
          for (const s of SCALE) {
            const v = D.studentTLpdf(y, nu, mu, s);
            const z = (y - mu) / s;
            expectClose(v, stdT(z, nu) - Math.log(s), 1e-11, `t(${y}|${nu},${mu},${s}) vs stdlib`);
            const j = logOf(jStat.studentt.pdf(z, nu) / s);
            if (j !== undefined && nu < 1e3) expectClose(v, j, REL_JSTAT, `t vs jStat`);
          }
  });

  it('cauchy: stdlib cauchy-logpdf and jStat.cauchy.pdf', () => {
    for (const y of Y)
      for (const mu of LOC)
        for (const s of SCALE) {
          const v = D.cauchyLpdf(y, mu, s);
          expectClose(v, stdCauchy(y, mu, s), REL, `cauchy(${y}|${mu},${s}) vs stdlib`);
          const j = logOf(jStat.cauchy.pdf(y, mu, s));
          if (j !== undefined) expectClose(v, j, REL_JSTAT, 'cauchy vs jStat');
        }
  });

  it('laplace: jStat.laplace.pdf', () => {
    let n = 0;
    for (const y of Y)
      for (const mu of LOC)
        for (const b of SCALE) {
          const j = logOf(jStat.laplace.pdf(y, mu, b));
          if (j !== undefined) expectClose(D.laplaceLpdf(y, mu, b), j, REL_JSTAT, `laplace(${y}|${mu},${b}) vs jStat`), n++;
        }
    expect(n).toBeGreaterThan(60);
  });

  it('logistic: density = F(z)(1 − F(z))/s with F the stdlib logistic-cdf (derivative of the logistic CDF, "Continuous Univariate Distributions", vol. 2 (2nd ed., Wiley 1995), ch. 23)', () => {
    let n = 0;
    for (const y of Y)
      for (const mu of LOC)
        for (const s of SCALE) {
          const z = (y - mu) / s;
          if (Math.abs(z) > 30) continue; // 1 − F loses its digits beyond this; tails are checked in tails.test.ts
          const F = stdLogisticCdf(y, mu, s);
          const ref = Math.log(F) + Math.log(stdLogisticCdf(-y, -mu, s)) - Math.log(s); // 1 − F(y) = F(−y) for the mirrored location
          expectClose(D.logisticLpdf(y, mu, s), ref, 1e-10, `logistic(${y}|${mu},${s})`);
          n++;
        }
    expect(n).toBeGreaterThan(40);
  });
});

describe('positive and unit-interval families', () => {
  const YP = [0, 1e-8, 0.03, 0.5, 1, 2.7, 15, 300];
  it('lognormal: stdlib lognormal-logpdf and jStat.lognormal.pdf, incl. y ≤ 0', () => {
    for (const y of [...YP, -1])
      for (const mu of LOC)
        for (const s of [0.05, 0.7, 3]) {
          const v = D.lognormalLpdf(y, mu, s);
          expectClose(v, stdLognormal(y, mu, s), REL, `lognormal(${y}|${mu},${s}) vs stdlib`);
          const j = y > 0 ? logOf(jStat.lognormal.pdf(y, mu, s)) : undefined;
          if (j !== undefined) expectClose(v, j, REL_JSTAT, 'lognormal vs jStat');
        }
  });

  it('gamma (shape, rate): stdlib gamma-logpdf (rate form) and jStat.gamma.pdf (scale = 1/rate), incl. y = 0 and y < 0', () => {
    for (const y of [...YP, -0.5])
      for (const a of [0.3, 1, 2.5, 40])
        for (const b of [0.01, 1, 7]) {
          const v = D.gammaLpdf(y, a, b);
          const ref = stdGamma(y, a, b);
          if (ref === -Infinity && y > 0) {
            // stdlib's gamma logpdf underflows to −Infinity where the density is below ~1e-308;
            // there the textbook formula α·log β − log Γ(α) + (α−1)·log y − β·y with jStat.gammaln is the reference.
            const closed = a * Math.log(b) - jStat.gammaln(a) + (a - 1) * Math.log(y) - b * y;
            expectClose(v, closed, 1e-9, `gamma(${y}|${a},${b}) vs closed form`);
            continue;
          }
          expectClose(v, ref, 1e-11, `gamma(${y}|${a},${b}) vs stdlib`);
          const j = y > 0 ? logOf(jStat.gamma.pdf(y, a, 1 / b)) : undefined;
          if (j !== undefined) expectClose(v, j, REL_JSTAT, `gamma(${y}|${a},${b}) vs jStat`);
        }
  });

  it('exponential: stdlib exponential-logpdf and jStat.exponential.pdf, incl. y = 0 and y < 0', () => {
    for (const y of [...YP, -0.5])
      for (const r of [0.01, 1, 7, 250]) {
        const v = D.exponentialLpdf(y, r);
        expectClose(v, stdExponential(y, r), REL, `exponential(${y}|${r}) vs stdlib`);
        const j = y >= 0 ? logOf(jStat.exponential.pdf(y, r)) : undefined;
        if (j !== undefined) expectClose(v, j, REL_JSTAT, 'exponential vs jStat');
      }
  });

  it('beta: stdlib beta-logpdf and jStat.beta.pdf, incl. y = 0, y = 1 and outside [0, 1]', () => {
    for (const y of [-0.1, 0, 1e-9, 0.01, 0.25, 0.5, 0.9, 1 - 1e-9, 1, 1.1])
      for (const a of [0.4, 1, 2, 35])
        for (const b of [0.6, 1, 3, 80]) {
          const v = D.betaLpdf(y, a, b);
          expectClose(v, stdBeta(y, a, b), 1e-11, `beta(${y}|${a},${b}) vs stdlib`);
          const j = y > 0 && y < 1 ? logOf(jStat.beta.pdf(y, a, b)) : undefined;
          if (j !== undefined) expectClose(v, j, REL_JSTAT, `beta(${y}|${a},${b}) vs jStat`);
        }
  });

  it('halfnormal: log 2 + stdlib normal-logpdf(y | 0, σ) for y ≥ 0 (folded normal, "Continuous Univariate Distributions", vol. 1 (2nd ed., Wiley 1994), §13.10)', () => {
    for (const y of [0, 1e-6, 0.3, 1, 4, 25])
      for (const s of [0.01, 1, 10, 500])
        expectClose(D.halfnormalLpdf(y, s), Math.LN2 + stdNormal(y, 0, s), REL, `halfnormal(${y}|${s})`);
    expect(D.halfnormalLpdf(-1e-12, 1)).toBe(-Infinity);
  });
});

describe('count families', () => {
  const KS = [0, 1, 2, 5, 17, 120, 1000];
  it('poisson: stdlib poisson-logpmf and jStat.poisson.pdf, incl. λ = 0 and non-integer k', () => {
    for (const k of [...KS, 1.5, -1])
      for (const lam of [0, 1e-6, 0.3, 4, 90, 2500]) {
        const v = D.poissonLpmf(k, lam);
        expectClose(v, stdPoisson(k, lam), 1e-11, `poisson(${k}|${lam}) vs stdlib`);
        const j = Number.isInteger(k) && k >= 0 && k < 150 && lam > 0 ? logOf(jStat.poisson.pdf(k, lam)) : undefined;
        if (j !== undefined) expectClose(v, j, REL_JSTAT, `poisson(${k}|${lam}) vs jStat`);
      }
  });

  it('poisson with log-rate: stdlib poisson-logpmf(k, e^η)', () => {
    for (const k of KS)
      for (const eta of [-20, -3, 0, 1.2, 4.5, 8]) expectClose(D.poissonLogLpmf(k, eta), stdPoisson(k, Math.exp(eta)), 1e-11, `poisson_lograte(${k}|${eta})`);
  });

  it('binomial: stdlib binomial-logpmf and jStat.binomial.pdf, incl. p ∈ {0, 1} and k outside 0…n', () => {
    for (const n of [0, 1, 7, 40, 500])
      for (const k of [-1, 0, 1, 3, 7, 20, 40, 250, 500, 501])
        for (const p of [0, 1e-7, 0.1, 0.5, 0.93, 1]) {
          const v = D.binomialLpmf(k, n, p);
          expectClose(v, stdBinomial(k, n, p), 1e-10, `binomial(${k}|${n},${p}) vs stdlib`);
          const j = k >= 0 && k <= n && n <= 40 ? logOf(jStat.binomial.pdf(k, n, p)) : undefined;
          if (j !== undefined) expectClose(v, j, 1e-9, `binomial(${k}|${n},${p}) vs jStat`);
        }
  });

  it('binomial on the log-odds scale: stdlib binomial-logpmf(k, n, logistic(η)) for moderate η', () => {
    for (const n of [1, 7, 40, 500])
      for (const k of [0, 1, 3, 7, 40, 250, 500])
        for (const eta of [-6, -1.5, 0, 0.4, 3, 9]) { // reference forms p, see the bernoulli note below
          if (k > n) continue;
          const p = 1 / (1 + Math.exp(-eta));
          expectClose(D.binomialLogitLpmf(k, n, eta), stdBinomial(k, n, p), 1e-9, `binomial_logodds(${k}|${n},${eta})`);
        }
  });

  it('bernoulli and its log-odds form: log of stdlib bernoulli-pmf', () => {
    for (const k of [0, 1])
      for (const p of [0, 1e-9, 0.2, 0.5, 0.999, 1]) {
        expectClose(D.bernoulliLpmf(k, p), Math.log(stdBernoulliPmf(k, p)), REL, `bernoulli(${k}|${p})`);
      }
    // |η| ≤ 12: forming p = logistic(η) for the reference costs about e^|η|·1e-16 in 1 − p; the
    // far tails are checked against closed forms in tails.test.ts.
    for (const k of [0, 1])
      for (const eta of [-12, -2, 0, 0.7, 5, 12]) {
        const p = 1 / (1 + Math.exp(-eta));
        expectClose(D.bernoulliLogitLpmf(k, eta), Math.log(stdBernoulliPmf(k, p)), 1e-9, `bernoulli_logodds(${k}|${eta})`);
      }
    expect(D.bernoulliLpmf(2, 0.5)).toBe(-Infinity);
    expect(D.bernoulliLogitLpmf(0.5, 0)).toBe(-Infinity);
  });

  it('discrete families sum to 1 over their support (normalising constants complete)', () => {
    let s = 0;
    for (let k = 0; k <= 25; k++) s += Math.exp(D.binomialLpmf(k, 25, 0.37));
    expectClose(s, 1, 1e-13, 'Σ binomial');
    s = 0;
    for (let k = 0; k <= 200; k++) s += Math.exp(D.poissonLpmf(k, 31.5));
    expectClose(s, 1, 1e-13, 'Σ poisson');
  });
});

describe('vector families', () => {
  it('dirichlet with K = 2 equals the beta density of its first coordinate (stdlib beta-logpdf)', () => {
    for (const x of [1e-6, 0.1, 0.5, 0.77])
      for (const a of [0.5, 1, 3.5])
        for (const b of [0.8, 1, 12]) {
          const v = D.dirichletLpdf(new Float64Array([x, 1 - x]), 0, new Float64Array([a, b]), 0, 2);
          expectClose(v, stdBeta(x, a, b), 1e-11, `dirichlet2(${x}|${a},${b})`);
        }
  });

  it('dirichlet, K = 4: closed form with jStat.gammaln ("Continuous Multivariate Distributions", vol. 1 (2nd ed., Wiley 2000), ch. 49)', () => {
    const x = new Float64Array([9, 0.1, 0.2, 0.3, 0.4]); // offset 1
    for (const alpha of [[1, 1, 1, 1], [0.5, 2, 3.25, 7], [40, 0.9, 1.5, 2]]) {
      const aSum = alpha.reduce((p, q) => p + q, 0);
      let ref = jStat.gammaln(aSum);
      for (let i = 0; i < 4; i++) ref += -jStat.gammaln(alpha[i]) + (alpha[i] - 1) * Math.log(x[1 + i]);
      const a = new Float64Array([0, 0, ...alpha]); // offset 2
      expectClose(D.dirichletLpdf(x, 1, a, 2, 4), ref, 1e-9, `dirichlet(${alpha})`);
    }
    // Uniform on the (K−1)-simplex: density (K−1)! because the simplex has volume 1/(K−1)! (handbook fact).
    expectClose(D.dirichletLpdf(x, 1, new Float64Array([1, 1, 1, 1]), 0, 4), Math.log(6), 1e-14, 'uniform simplex K = 4');
  });

  it('dirichlet edges: off the simplex, zero coordinates, invalid α', () => {
    const one = new Float64Array([1, 1, 1]);
    expect(D.dirichletLpdf(new Float64Array([0.5, 0.6, 0]), 0, one, 0, 3)).toBe(-Infinity);
    expect(D.dirichletLpdf(new Float64Array([-0.1, 0.6, 0.5]), 0, one, 0, 3)).toBe(-Infinity);
    expectClose(D.dirichletLpdf(new Float64Array([0, 0.4, 0.6]), 0, one, 0, 3), Math.log(2), 1e-14, 'face, α = 1');
    expect(D.dirichletLpdf(new Float64Array([0, 0.4, 0.6]), 0, new Float64Array([0.5, 1, 1]), 0, 3)).toBe(Infinity);
    expect(D.dirichletLpdf(new Float64Array([0, 0.4, 0.6]), 0, new Float64Array([2, 1, 1]), 0, 3)).toBe(-Infinity);
    expect(D.dirichletLpdf(new Float64Array([0.2, 0.3, 0.5]), 0, new Float64Array([0, 1, 1]), 0, 3)).toBeNaN();
    expect(D.dirichletLpdf(new Float64Array([0.2, 0.3, 0.5]), 0, one, 0, 0)).toBeNaN();
  });

  it('multinomial with K = 2 equals the binomial (stdlib binomial-logpmf); K = 3 against hand-computed factorials', () => {
    for (const [k1, k2] of [[0, 0], [3, 7], [0, 12], [55, 45]])
      for (const p of [0.01, 0.4, 0.75]) {
        const v = D.multinomialLpmf(new Float64Array([k1, k2]), 0, new Float64Array([p, 1 - p]), 0, 2);
        expectClose(v, stdBinomial(k1, k1 + k2, p), 1e-11, `multinomial2(${k1},${k2}|${p})`);
      }
    // k = (2, 1, 3), p = (0.2, 0.3, 0.5): 6!/(2!·1!·3!) = 60, 60 · 0.2² · 0.3 · 0.5³ = 0.09 (by hand).
    expectClose(D.multinomialLpmf(new Float64Array([2, 1, 3]), 0, new Float64Array([0.2, 0.3, 0.5]), 0, 3), Math.log(0.09), 1e-14, 'multinomial3');
  });

  it('multinomial sums to 1 over all count vectors with N = 6, K = 3', () => {
    const p = new Float64Array([0.15, 0.6, 0.25]);
    let s = 0;
    for (let a = 0; a <= 6; a++) for (let b = 0; a + b <= 6; b++) s += Math.exp(D.multinomialLpmf(new Float64Array([a, b, 6 - a - b]), 0, p, 0, 3));
    expectClose(s, 1, 1e-14, 'Σ multinomial');
  });

  it('multinomial edges', () => {
    const p = new Float64Array([0.2, 0.3, 0.5]);
    expect(D.multinomialLpmf(new Float64Array([1, -1, 2]), 0, p, 0, 3)).toBe(-Infinity);
    expect(D.multinomialLpmf(new Float64Array([1, 0.5, 2]), 0, p, 0, 3)).toBe(-Infinity);
    expect(D.multinomialLpmf(new Float64Array([1, 2, 3]), 0, new Float64Array([0, 0.5, 0.5]), 0, 3)).toBe(-Infinity);
    expectClose(D.multinomialLpmf(new Float64Array([0, 2, 3]), 0, new Float64Array([0, 0.5, 0.5]), 0, 3), Math.log(10 / 32), 1e-14, 'zero cell with p = 0');
    expect(D.multinomialLpmf(new Float64Array([1, 2, 3]), 0, new Float64Array([0.2, 0.3, 0.6]), 0, 3)).toBeNaN();
    expect(D.multinomialLpmf(new Float64Array([1, 2, 3]), 0, new Float64Array([-0.1, 0.6, 0.5]), 0, 3)).toBeNaN();
  });
});

describe('documented edge cases (our contract: invalid parameters → NaN, outside the support → −Infinity)', () => {
  it('scale ≤ 0, infinite or NaN parameters give NaN', () => {
    for (const s of [0, -1, Infinity, NaN]) {
      expect(D.normalLpdf(0, 0, s)).toBeNaN();
      expect(D.studentTLpdf(0, 3, 0, s)).toBeNaN();
      expect(D.cauchyLpdf(0, 0, s)).toBeNaN();
      expect(D.laplaceLpdf(0, 0, s)).toBeNaN();
      expect(D.logisticLpdf(0, 0, s)).toBeNaN();
      expect(D.lognormalLpdf(1, 0, s)).toBeNaN();
      expect(D.gammaLpdf(1, s, 1)).toBeNaN();
      expect(D.gammaLpdf(1, 1, s)).toBeNaN();
      expect(D.exponentialLpdf(1, s)).toBeNaN();
      expect(D.betaLpdf(0.5, s, 1)).toBeNaN();
      expect(D.halfnormalLpdf(1, s)).toBeNaN();
      expect(D.studentTLpdf(0, s, 0, 1)).toBeNaN();
    }
    expect(D.normalLpdf(NaN, 0, 1)).toBeNaN();
    expect(D.normalLpdf(0, Infinity, 1)).toBeNaN();
    expect(D.poissonLpmf(1, -1)).toBeNaN();
    expect(D.binomialLpmf(1, 2.5, 0.5)).toBeNaN();
    expect(D.binomialLpmf(1, 3, 1.5)).toBeNaN();
    expect(D.bernoulliLpmf(1, -0.1)).toBeNaN();
    expect(D.poissonLogLpmf(1, NaN)).toBeNaN();
  });

  it('points outside the support give −Infinity', () => {
    expect(D.normalLpdf(Infinity, 0, 1)).toBe(-Infinity);
    expect(D.lognormalLpdf(-1, 0, 1)).toBe(-Infinity);
    expect(D.gammaLpdf(-1, 2, 1)).toBe(-Infinity);
    expect(D.exponentialLpdf(-0.001, 2)).toBe(-Infinity);
    expect(D.betaLpdf(1.01, 2, 2)).toBe(-Infinity);
    expect(D.poissonLpmf(2.5, 1)).toBe(-Infinity);
    expect(D.poissonLogLpmf(-1, 0)).toBe(-Infinity);
    expect(D.binomialLpmf(6, 5, 0.5)).toBe(-Infinity);
    expect(D.binomialLogitLpmf(-1, 5, 0)).toBe(-Infinity);
  });

  it('partials follow the value: NaN partials for NaN, 0 for −Infinity', () => {
    const out = new Float64Array(4).fill(7);
    expect(D.normalLpdfGrad(0, 0, -1, out, 0)).toBeNaN();
    expect([...out.subarray(0, 3)].every(Number.isNaN)).toBe(true);
    out.fill(7);
    expect(D.gammaLpdfGrad(-1, 2, 1, out, 1)).toBe(-Infinity);
    expect([...out]).toEqual([7, 0, 0, 0]);
  });
});
