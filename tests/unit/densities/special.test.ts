/**
 * The special functions behind the densities: log-gamma against jStat.gammaln and exact
 * factorials, digamma against closed forms ("Handbook of Mathematical Functions", NBS 1964, 6.3.2–6.3.3), log-beta and the
 * log-binomial coefficient against jStat and exact integers.
 */
import { describe, expect, it } from 'vitest';
import * as D from '../../../server/engine/densities';
import { expectClose, jStat } from './helpers';

const EULER_GAMMA = 0.5772156649015329; // Euler–Mascheroni constant (A&S 6.1.3)

describe('special functions', () => {
  it('lgamma: exact factorials and jStat.gammaln (Lanczos, ~2e-10)', () => {
    let fact = 1;
    for (let n = 1; n <= 20; n++) {
      expectClose(D.lgamma(n + 1), Math.log((fact *= n)), 1e-15, `log ${n}!`);
    }
    expectClose(D.lgamma(0.5), 0.5 * Math.log(Math.PI), 1e-15, 'Γ(½) = √π');
    for (const x of [0.01, 0.3, 1.7, 4.2, 33, 250, 1e5]) expectClose(D.lgamma(x), jStat.gammaln(x), 2e-10, `lgamma(${x}) vs jStat`);
    expect(D.lgamma(0)).toBe(Infinity);
    expect(D.lgamma(NaN)).toBeNaN();
  });

  it('digamma: ψ(1) = −γ, ψ(½) = −γ − 2 log 2, ψ(n+1) = H_n − γ (A&S 6.3.2–6.3.3)', () => {
    expectClose(D.digamma(1), -EULER_GAMMA, 1e-15, 'ψ(1)');
    expectClose(D.digamma(0.5), -EULER_GAMMA - 2 * Math.LN2, 1e-15, 'ψ(½)');
    let h = 0;
    for (let n = 1; n <= 30; n++) {
      h += 1 / n;
      expectClose(D.digamma(n + 1), h - EULER_GAMMA, 1e-14, `ψ(${n + 1})`);
    }
  });

  it('lbeta and lchoose: exact values and jStat.combinationln', () => {
    expectClose(D.lbeta(2, 3), Math.log(1 / 12), 1e-15, 'B(2, 3) = 1/12');
    expectClose(D.lbeta(1, 1), 0, 1e-15, 'B(1, 1)');
    expectClose(D.lchoose(5, 2), Math.log(10), 1e-15, 'C(5, 2)');
    expectClose(D.lchoose(52, 5), Math.log(2598960), 1e-14, 'C(52, 5)');
    expect(D.lchoose(7, 0)).toBe(0);
    expect(D.lchoose(7, 7)).toBe(0);
    for (const [n, k] of [[30, 12], [400, 17], [1e6, 5e5]]) expectClose(D.lchoose(n, k), jStat.combinationln(n, k), 1e-9, `C(${n}, ${k}) vs jStat`);
  });

  it('logistic family identities: logistic(x) + logistic(−x) = 1, softplus(x) − softplus(−x) = x', () => {
    for (const x of [-30, -2.5, 0, 0.1, 7, 35]) {
      expectClose(D.logistic(x) + D.logistic(-x), 1, 1e-15, `logistic(${x})`);
      expectClose(D.softplus(x) - D.softplus(-x), x, 1e-14, `softplus(${x})`);
      expectClose(D.logLogistic(x), Math.log(D.logistic(x)), 1e-13, `log_logistic(${x})`);
    }
  });

  it('pow, abs, sqrt, log edges as documented', () => {
    const o = new Float64Array(2);
    expect(D.powGrad(0, 2, o, 0)).toBe(0);
    expect([...o]).toEqual([0, 0]);
    expect(D.powGrad(-2, 2, o, 0)).toBe(4);
    expect(o[0]).toBe(-4);
    expect(o[1]).toBeNaN();
    expect(D.powGrad(5, 0, o, 0)).toBe(1);
    expect(o[0]).toBe(0);
    expect(D.absGrad(0, o, 0)).toBe(0);
    expect(o[0]).toBe(0);
    expect(D.logGrad(-1, o, 0)).toBeNaN();
    expect(o[0]).toBeNaN();
    expect(D.sqrtGrad(0, o, 0)).toBe(0);
    expect(o[0]).toBe(Infinity);
  });
});
