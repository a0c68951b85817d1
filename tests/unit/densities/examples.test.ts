/**
 * The worked examples written in the functions' doc comments hold. Expected values are the closed
 * forms written there (e.g. −½·log(2π) for the standard normal at 0, log(120/1024) for 3 of 10 at
 * p = ½), computed here from Math, or the rounded figures the comments quote (5 decimals).
 */
import { describe, expect, it } from 'vitest';
import * as D from '../../../server/engine/densities';

const f64 = (...v: number[]) => new Float64Array(v);
const LOG = Math.log;
type Row = [string, () => number, number];

const EXACT: Row[] = [
  ['normalLpdf(0, 0, 1)', () => D.normalLpdf(0, 0, 1), -0.5 * LOG(2 * Math.PI)],
  ['studentTLpdf(0, 1, 0, 1)', () => D.studentTLpdf(0, 1, 0, 1), -LOG(Math.PI)],
  ['studentTLpdf(0, 3, 0, 1)', () => D.studentTLpdf(0, 3, 0, 1), LOG(2 / (Math.PI * Math.sqrt(3)))],
  ['cauchyLpdf(0, 0, 1)', () => D.cauchyLpdf(0, 0, 1), -LOG(Math.PI)],
  ['cauchyLpdf(1, 0, 1)', () => D.cauchyLpdf(1, 0, 1), -LOG(2 * Math.PI)],
  ['laplaceLpdf(0, 0, 1)', () => D.laplaceLpdf(0, 0, 1), -LOG(2)],
  ['laplaceLpdf(3, 1, 2)', () => D.laplaceLpdf(3, 1, 2), -LOG(4) - 1],
  ['logisticLpdf(0, 0, 1)', () => D.logisticLpdf(0, 0, 1), -LOG(4)],
  ['logisticLpdf(800, 0, 1)', () => D.logisticLpdf(800, 0, 1), -800],
  ['lognormalLpdf(1, 0, 1)', () => D.lognormalLpdf(1, 0, 1), -0.5 * LOG(2 * Math.PI)],
  ['lognormalLpdf(e, 0, 1)', () => D.lognormalLpdf(Math.E, 0, 1), -1.5 - 0.5 * LOG(2 * Math.PI)],
  ['gammaLpdf(1, 1, 1)', () => D.gammaLpdf(1, 1, 1), -1],
  ['gammaLpdf(2, 3, 2)', () => D.gammaLpdf(2, 3, 2), 4 * LOG(2) - 4],
  ['exponentialLpdf(0, 2)', () => D.exponentialLpdf(0, 2), LOG(2)],
  ['exponentialLpdf(1.5, 2)', () => D.exponentialLpdf(1.5, 2), LOG(2) - 3],
  ['betaLpdf(0.5, 1, 1)', () => D.betaLpdf(0.5, 1, 1), 0],
  ['betaLpdf(0.25, 2, 3)', () => D.betaLpdf(0.25, 2, 3), LOG(12 * 0.25 * 0.75 ** 2)],
  ['halfnormalLpdf(0, 1)', () => D.halfnormalLpdf(0, 1), 0.5 * LOG(2 / Math.PI)],
  ['halfnormalLpdf(2, 2)', () => D.halfnormalLpdf(2, 2), 0.5 * LOG(2 / Math.PI) - LOG(2) - 0.5],
  ['poissonLpmf(0, 2)', () => D.poissonLpmf(0, 2), -2],
  ['poissonLpmf(3, 2)', () => D.poissonLpmf(3, 2), 3 * LOG(2) - 2 - LOG(6)],
  ['poissonLogLpmf(0, 0)', () => D.poissonLogLpmf(0, 0), -1],
  ['poissonLogLpmf(3, log 2)', () => D.poissonLogLpmf(3, LOG(2)), 3 * LOG(2) - 2 - LOG(6)],
  ['poissonLogLpmf(2, −700)', () => D.poissonLogLpmf(2, -700), -1400 - Math.exp(-700) - LOG(2)],
  ['binomialLpmf(3, 10, 0.5)', () => D.binomialLpmf(3, 10, 0.5), LOG(120 / 1024)],
  ['binomialLpmf(0, 5, 0)', () => D.binomialLpmf(0, 5, 0), 0],
  ['binomialLogitLpmf(3, 10, 0)', () => D.binomialLogitLpmf(3, 10, 0), LOG(120 / 1024)],
  ['binomialLogitLpmf(0, 10, 800)', () => D.binomialLogitLpmf(0, 10, 800), -8000],
  ['bernoulliLpmf(1, 0.25)', () => D.bernoulliLpmf(1, 0.25), LOG(0.25)],
  ['bernoulliLpmf(0, 0.25)', () => D.bernoulliLpmf(0, 0.25), LOG(0.75)],
  ['bernoulliLogitLpmf(1, 0)', () => D.bernoulliLogitLpmf(1, 0), -LOG(2)],
  ['bernoulliLogitLpmf(1, −800)', () => D.bernoulliLogitLpmf(1, -800), -800],
  ['bernoulliLogitLpmf(0, 800)', () => D.bernoulliLogitLpmf(0, 800), -800],
  ['dirichletLpdf([0.2, 0.3, 0.5] | 1, 1, 1)', () => D.dirichletLpdf(f64(0.2, 0.3, 0.5), 0, f64(1, 1, 1), 0, 3), LOG(2)],
  ['dirichletLpdf([0.25, 0.75] | 2, 3)', () => D.dirichletLpdf(f64(0.25, 0.75), 0, f64(2, 3), 0, 2), LOG(12 * 0.25 * 0.75 ** 2)],
  ['multinomialLpmf([1, 2, 0] | 0.2, 0.3, 0.5)', () => D.multinomialLpmf(f64(1, 2, 0), 0, f64(0.2, 0.3, 0.5), 0, 3), LOG(0.054)],
  ['multinomialLpmf([3, 7] | 0.4, 0.6)', () => D.multinomialLpmf(f64(3, 7), 0, f64(0.4, 0.6), 0, 2), D.binomialLpmf(3, 10, 0.4)],
  ['multinomialLpmf([0, 0] | 0.3, 0.7)', () => D.multinomialLpmf(f64(0, 0), 0, f64(0.3, 0.7), 0, 2), 0],
  ['lgamma(1)', () => D.lgamma(1), 0],
  ['lgamma(0.5)', () => D.lgamma(0.5), 0.5 * LOG(Math.PI)],
  ['lgamma(10)', () => D.lgamma(10), LOG(362880)],
  ['lbeta(1, 1)', () => D.lbeta(1, 1), 0],
  ['lbeta(2, 3)', () => D.lbeta(2, 3), LOG(1 / 12)],
  ['lchoose(5, 2)', () => D.lchoose(5, 2), LOG(10)],
  ['logistic(0)', () => D.logistic(0), 0.5],
  ['softplus(0)', () => D.softplus(0), LOG(2)],
  ['softplus(800)', () => D.softplus(800), 800],
  ['logLogistic(0)', () => D.logLogistic(0), -LOG(2)],
  ['logLogistic(−800)', () => D.logLogistic(-800), -800],
  ['logSumExp2(0, 0)', () => D.logSumExp2(0, 0), LOG(2)],
  ['logSumExp2(1000, 1000)', () => D.logSumExp2(1000, 1000), 1000 + LOG(2)],
  ['logSumExp([0, 0, 0])', () => D.logSumExp(f64(0, 0, 0), 0, 3), LOG(3)],
];

const QUOTED: Row[] = [
  ['normalLpdf(0, 0, 1) ≈ −0.91894', () => D.normalLpdf(0, 0, 1), -0.91894],
  ['normalLpdf(1, 0, 2) ≈ −1.73709', () => D.normalLpdf(1, 0, 2), -1.73709],
  ['studentTLpdf(0, 3, 0, 1) ≈ −1.00089', () => D.studentTLpdf(0, 3, 0, 1), -1.00089],
  ['cauchyLpdf(0, 0, 1) ≈ −1.14473', () => D.cauchyLpdf(0, 0, 1), -1.14473],
  ['cauchyLpdf(1, 0, 1) ≈ −1.83788', () => D.cauchyLpdf(1, 0, 1), -1.83788],
  ['laplaceLpdf(3, 1, 2) ≈ −2.38629', () => D.laplaceLpdf(3, 1, 2), -2.38629],
  ['logisticLpdf(0, 0, 1) ≈ −1.38629', () => D.logisticLpdf(0, 0, 1), -1.38629],
  ['lognormalLpdf(e, 0, 1) ≈ −2.41894', () => D.lognormalLpdf(Math.E, 0, 1), -2.41894],
  ['gammaLpdf(2, 3, 2) ≈ −1.22741', () => D.gammaLpdf(2, 3, 2), -1.22741],
  ['betaLpdf(0.25, 2, 3) ≈ 0.52325', () => D.betaLpdf(0.25, 2, 3), 0.52325],
  ['halfnormalLpdf(0, 1) ≈ −0.22579', () => D.halfnormalLpdf(0, 1), -0.22579],
  ['halfnormalLpdf(2, 2) ≈ −1.41894', () => D.halfnormalLpdf(2, 2), -1.41894],
  ['poissonLpmf(3, 2) ≈ −1.71232', () => D.poissonLpmf(3, 2), -1.71232],
  ['poissonLogLpmf(2, −700) ≈ −1400.693', () => D.poissonLogLpmf(2, -700), -1400.693],
  ['binomialLpmf(3, 10, 0.5) ≈ −2.14398', () => D.binomialLpmf(3, 10, 0.5), -2.14398],
  ['multinomialLpmf([1, 2, 0] | …) ≈ −2.91877', () => D.multinomialLpmf(f64(1, 2, 0), 0, f64(0.2, 0.3, 0.5), 0, 3), -2.91877],
  ['lgamma(0.5) ≈ 0.5724', () => D.lgamma(0.5), 0.5724],
  ['lgamma(10) ≈ 12.8018', () => D.lgamma(10), 12.8018],
  ['lbeta(2, 3) ≈ −2.4849', () => D.lbeta(2, 3), -2.4849],
  ['digamma(0.5) ≈ −1.9635', () => D.digamma(0.5), -1.9635],
];

const SPECIAL: [string, () => number, number][] = [
  ['normalLpdf(0, 0, 0)', () => D.normalLpdf(0, 0, 0), NaN],
  ['normalLpdf(Infinity, 0, 1)', () => D.normalLpdf(Infinity, 0, 1), -Infinity],
  ['studentTLpdf(1, 0, 0, 1)', () => D.studentTLpdf(1, 0, 0, 1), NaN],
  ['cauchyLpdf(0, 0, −1)', () => D.cauchyLpdf(0, 0, -1), NaN],
  ['laplaceLpdf(0, 0, 0)', () => D.laplaceLpdf(0, 0, 0), NaN],
  ['logisticLpdf(0, 0, −1)', () => D.logisticLpdf(0, 0, -1), NaN],
  ['lognormalLpdf(0, 0, 1)', () => D.lognormalLpdf(0, 0, 1), -Infinity],
  ['lognormalLpdf(−1, 0, 1)', () => D.lognormalLpdf(-1, 0, 1), -Infinity],
  ['gammaLpdf(0, 0.5, 1)', () => D.gammaLpdf(0, 0.5, 1), Infinity],
  ['gammaLpdf(−1, 2, 1)', () => D.gammaLpdf(-1, 2, 1), -Infinity],
  ['gammaLpdf(1, 0, 1)', () => D.gammaLpdf(1, 0, 1), NaN],
  ['exponentialLpdf(−0.1, 2)', () => D.exponentialLpdf(-0.1, 2), -Infinity],
  ['exponentialLpdf(1, 0)', () => D.exponentialLpdf(1, 0), NaN],
  ['betaLpdf(0, 0.5, 0.5)', () => D.betaLpdf(0, 0.5, 0.5), Infinity],
  ['betaLpdf(1.2, 2, 2)', () => D.betaLpdf(1.2, 2, 2), -Infinity],
  ['betaLpdf(0.5, −1, 1)', () => D.betaLpdf(0.5, -1, 1), NaN],
  ['halfnormalLpdf(−0.5, 1)', () => D.halfnormalLpdf(-0.5, 1), -Infinity],
  ['halfnormalLpdf(1, 0)', () => D.halfnormalLpdf(1, 0), NaN],
  ['poissonLpmf(1.5, 2)', () => D.poissonLpmf(1.5, 2), -Infinity],
  ['poissonLpmf(2, −1)', () => D.poissonLpmf(2, -1), NaN],
  ['binomialLpmf(6, 5, 0.5)', () => D.binomialLpmf(6, 5, 0.5), -Infinity],
  ['binomialLpmf(1, 5, 1.5)', () => D.binomialLpmf(1, 5, 1.5), NaN],
  ['bernoulliLpmf(2, 0.5)', () => D.bernoulliLpmf(2, 0.5), -Infinity],
  ['bernoulliLpmf(1, 1.1)', () => D.bernoulliLpmf(1, 1.1), NaN],
  ['dirichletLpdf([0.5, 0.6] | 1, 1)', () => D.dirichletLpdf(f64(0.5, 0.6), 0, f64(1, 1), 0, 2), -Infinity],
  ['dirichletLpdf(… | 0, 1)', () => D.dirichletLpdf(f64(0.5, 0.5), 0, f64(0, 1), 0, 2), NaN],
  ['multinomialLpmf([1, 0] | 0.5, 0.6)', () => D.multinomialLpmf(f64(1, 0), 0, f64(0.5, 0.6), 0, 2), NaN],
  ['lgamma(0)', () => D.lgamma(0), Infinity],
];

describe('doc-comment examples', () => {
  it.each(EXACT)('%s equals its closed form', (_, f, want) => {
    const got = f();
    // Different but equivalent floating-point routes: agreement to 1e-14 relative (a few dozen ulps).
    expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-14 * Math.max(1, Math.abs(want)));
  });
  it.each(QUOTED)('%s (as quoted)', (_, f, want) => {
    const decimals = (String(Math.abs(want)).split('.')[1] ?? '').length;
    expect(Math.abs(f() - want)).toBeLessThanOrEqual(0.5 * 10 ** -decimals);
  });
  it.each(SPECIAL)('%s is %s', (_, f, want) => {
    expect(Object.is(f(), want) || (Number.isNaN(want) && Number.isNaN(f()))).toBe(true);
  });
  it('the −0 examples: tails that round to zero stay ≤ 0', () => {
    for (const v of [D.binomialLogitLpmf(10, 10, 800), D.bernoulliLogitLpmf(1, 800), D.logLogistic(800)]) {
      expect(v <= 0 && v > -1e-300).toBe(true);
    }
  });
});
