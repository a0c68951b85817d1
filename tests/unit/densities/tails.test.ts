/**
 * Tail stability: values and partials stay finite and accurate where a naive formula overflows,
 * underflows or cancels. Each expected value is a closed form written out here, with its source.
 */
import { describe, expect, it } from 'vitest';
import * as D from '../../../server/engine/densities';
import { expectClose } from './helpers';

const out = new Float64Array(4);

describe('logit-scale families at |η| = 800 (where e^η overflows)', () => {
  // Identity log logistic(η) = −log(1 + e^(−η)) = −softplus(−η); for η ≤ −40, log(1 + e^η) = e^η to
  // double precision, so log logistic(η) = η − e^η ≈ η (Taylor series of log1p, common practice).
  it('bernoulli on the log-odds scale', () => {
    expect(D.bernoulliLogitLpmfGrad(1, -800, out, 0)).toBe(-800);
    expect(out[1]).toBe(1); // ∂η = logistic(800) = 1 in double precision
    expect(D.bernoulliLogitLpmfGrad(0, 800, out, 0)).toBe(-800);
    expect(out[1]).toBe(-1);
    const v = D.bernoulliLogitLpmfGrad(1, 800, out, 0); // −log(1 + e^(−800)) = −e^(−800), underflows to −0
    expect(Number.isFinite(v) && v <= 0 && v > -1e-300).toBe(true);
    expect(Math.abs(out[1])).toBeLessThan(1e-300);
    // η = −40: exact value −40 − log1p(e^(−40)) = −40 − 4.248354255291589e-18 → −40 in double.
    expectClose(D.bernoulliLogitLpmf(1, -40), -40, 1e-16, 'η = −40');
    // Mid-tail where the naive log(1 − p) loses digits: k = 0, η = 20 → −(20 + log1p(e^(−20))).
    expectClose(D.bernoulliLogitLpmf(0, 20), -(20 + Math.log1p(Math.exp(-20))), 1e-16, 'η = 20');
  });

  it('binomial on the log-odds scale', () => {
    // log C(10, 3) + 3·log logistic(−800) + 7·log logistic(800) = log 120 − 2400 (−7·e^(−800) vanishes).
    expectClose(D.binomialLogitLpmfGrad(3, 10, -800, out, 0), Math.log(120) - 2400, 1e-15, 'k = 3, η = −800');
    expect(out[2]).toBe(3); // ∂η = k − n·logistic(η) = 3 − 10·e^(−800) = 3
    expectClose(D.binomialLogitLpmfGrad(3, 10, 800, out, 0), Math.log(120) - 7 * 800, 1e-15, 'k = 3, η = 800');
    expect(out[2]).toBe(-7);
    expect(D.binomialLogitLpmf(10, 10, 800)).toBeCloseTo(0, 300);
  });

  it('poisson on the log-rate scale', () => {
    // k·η − e^η − log k!: with η = −700, λ = e^(−700) ≈ 9.86e−305 (near the subnormal range).
    expectClose(D.poissonLogLpmf(2, -700), -1400 - Math.exp(-700) - Math.log(2), 1e-15, 'η = −700');
    expect(D.poissonLogLpmfGrad(2, -700, out, 0)).toBeLessThan(-1399);
    expect(out[1]).toBe(2);
    // e^800 overflows: the true value is below −1e300, reported as −Infinity with zero partials.
    expect(D.poissonLogLpmf(3, 800)).toBe(-Infinity);
  });

  it('math functions', () => {
    expect(D.softplus(800)).toBe(800);
    expect(D.softplus(-800)).toBeGreaterThanOrEqual(0);
    expect(D.softplus(-800)).toBeLessThan(1e-300);
    expect(D.logLogistic(-800)).toBe(-800);
    expect(D.logistic(-800)).toBeGreaterThanOrEqual(0);
    expect(D.logistic(800)).toBe(1);
    // softplus(40) = 40 + log1p(e^(−40)); softplus(−40) = log1p(e^(−40)) = e^(−40) − e^(−80)/2 … (Taylor).
    expectClose(D.softplus(-40), Math.exp(-40), 1e-15, 'softplus(−40)');
    expect(Math.abs(D.softplus(-40) / Math.exp(-40) - 1)).toBeLessThan(1e-15);
    D.logisticGrad(-800, out, 0);
    expect(Number.isFinite(out[0])).toBe(true);
    D.logLogisticGrad(-800, out, 0);
    expect(out[0]).toBe(1);
  });
});

describe('log_sum_exp far from 0 (where exp overflows or underflows)', () => {
  it('equal large and small entries: log(n·e^a) = a + log n', () => {
    const big = new Float64Array([1000, 1000, 1000]);
    const g = new Float64Array(3);
    expectClose(D.logSumExpGrad(big, 0, 3, g, 0), 1000 + Math.log(3), 1e-16, 'lse(1000 ×3)');
    for (const w of g) expectClose(w, 1 / 3, 1e-15, 'softmax weight');
    expectClose(D.logSumExp(new Float64Array([-1000, -1000]), 0, 2), -1000 + Math.log(2), 1e-16, 'lse(−1000 ×2)');
    expectClose(D.logSumExp2(1000, 1000), 1000 + Math.LN2, 1e-16, 'lse2(1000, 1000)');
    expect(D.logSumExp2(-Infinity, 3)).toBe(3);
    expect(D.logSumExp(new Float64Array(0), 0, 0)).toBe(-Infinity);
    expect(D.logSumExp(new Float64Array([-Infinity, -Infinity]), 0, 2)).toBe(-Infinity);
    expect(D.logSumExp(new Float64Array([1, NaN]), 0, 2)).toBeNaN();
  });
});

describe('densities in their tails', () => {
  it('logistic density at z = ±800: −|z| − log s (the 2·log1p(e^(−|z|)) term vanishes)', () => {
    expectClose(D.logisticLpdf(800, 0, 1), -800, 1e-16, 'z = 800');
    expectClose(D.logisticLpdf(-1600, 0, 2), -800 - Math.log(2), 1e-16, 'z = −800');
    D.logisticLpdfGrad(800, 0, 1, out, 0);
    expect(out[0]).toBe(-1); // −tanh(400)
  });

  it('normal with a tiny scale far from the mean stays finite', () => {
    // −½·(10/1e-3)² − log(1e-3) − ½·log(2π) = −5e7 + 6.907755… − 0.918938…
    expectClose(D.normalLpdf(10, 0, 1e-3), -5e7 + 3 * Math.log(10) - 0.5 * Math.log(2 * Math.PI), 1e-15, 'normal tail');
  });

  it('student_t with ν = 1e7 agrees with the normal to 1e-6 (the t tends to the normal as ν → ∞)', () => {
    for (const y of [-3, -0.5, 0, 1.2, 4]) expectClose(D.studentTLpdf(y, 1e7, 0.3, 1.5), D.normalLpdf(y, 0.3, 1.5), 1e-6, `y = ${y}`);
  });

  it('binomial with p = 1e-300 stays finite: k·log p + (n−k)·log1p(−p) + log C(n, k)', () => {
    expectClose(D.binomialLpmf(2, 5, 1e-300), Math.log(10) + 2 * Math.log(1e-300), 1e-15, 'binomial tiny p');
  });

  it('beta with large shapes uses an accurate log-beta (no cancellation in lgamma differences)', () => {
    // Beta(5000, 5000) at its mode 0.5: the density there ≈ √(2(a+b)/π)… by the normal approximation;
    // the exact value uses log B(a, b) = log Γ(a) + log Γ(b) − log Γ(a+b) — checked against the
    // normal approximation with variance ab/((a+b)²(a+b+1)) ("Continuous Univariate Distributions", vol. 2 (2nd ed., Wiley 1995),
    // ch. 25), which is accurate to O(1/(a+b)) here.
    const a = 5000;
    const sd = Math.sqrt((a * a) / (4 * a * a * (2 * a + 1)));
    expectClose(D.betaLpdf(0.5, a, a), -Math.log(sd) - 0.5 * Math.log(2 * Math.PI), 2e-4, 'beta(0.5 | 5000, 5000)');
  });
});
