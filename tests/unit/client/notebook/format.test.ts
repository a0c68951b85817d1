import { describe, expect, it } from 'vitest';
import { columnDecimals, formatDataFixed, formatEss, formatEstimate, formatRhat, formatSeconds } from '../../../../src/lib/estimates';
import { essFails, rhatFails } from '../../../../shared/diagnostics';
import { judgeRun } from '../../../../server/engine/diagnostics/verdict';

describe('formatting', () => {
  it('keeps three significant digits and a true minus sign', () => {
    expect(formatEstimate(3.14159)).toBe('3.14');
    expect(formatEstimate(-0.012345)).toBe('−0.0123');
    expect(formatEstimate(1234.5)).toBe('1230');
    expect(formatEstimate(123456)).toBe('1.23e5');
    expect(formatEstimate(0.0000123)).toBe('1.23e-5');
    expect(formatEstimate(0)).toBe('0');
    // Trailing zeros stay: every number in a column carries the same number of significant digits.
    expect(formatEstimate(4.5)).toBe('4.50');
    expect(formatEstimate(0.08)).toBe('0.0800');
    expect(formatEstimate(12)).toBe('12.0');
    expect(formatEstimate(0.5, 2)).toBe('0.50');
    expect(formatEstimate(NaN)).toBe('NaN');
  });
  it('R̂ with three decimals, ESS whole', () => {
    expect(formatRhat(1.00449)).toBe('1.004');
    expect(formatEss(401.6)).toBe('402');
  });
  it('seconds in a readable unit', () => {
    expect(formatSeconds(0.25)).toBe('250 ms');
    expect(formatSeconds(12.34)).toBe('12.3 s');
    expect(formatSeconds(125)).toBe('2 min 5 s');
  });
});

describe('data columns with one count of decimals', () => {
  it('keeps the trailing zeros of 29.70 beside 29.02 (values of the demo outlet table)', () => {
    const col = [29.02, 29.7, 31.67, 30.1, 34.5];
    const d = columnDecimals(col);
    expect(d).toBe(2);
    expect(col.map((x) => formatDataFixed(x, d))).toEqual(['29.02', '29.70', '31.67', '30.10', '34.50']);
  });

  it('whole numbers stay whole, a minus is a true minus, exponent form leaves each value its own form', () => {
    expect(columnDecimals([7, 10, 12])).toBe(0);
    expect(formatDataFixed(-3.2, columnDecimals([-3.2, 1.25]))).toBe('−3.20');
    expect(columnDecimals([0.00001, 2.5])).toBeNull();
    expect(formatDataFixed(2.5, null)).toBe('2.5');
  });
});

describe('failing thresholds (Improved R̂, Bayesian Analysis 2021: R̂ ≤ 1.01, ESS ≥ 100 per chain)', () => {
  it('flags R̂ above 1.01 and non-finite R̂; 1.01 itself passes', () => {
    expect(rhatFails(1.009)).toBe(false);
    expect(rhatFails(1.01)).toBe(false);
    expect(rhatFails(1.0101)).toBe(true);
    expect(rhatFails(NaN)).toBe(true);
  });
  it('the summary and the verdict judge the boundary alike (one definition in shared/diagnostics)', () => {
    for (const [rhat, ess] of [[1.01, 400], [1.0101, 400], [1.0, 399], [1.0, 400]] as const) {
      const v = judgeRun({ chains: 4, draws: 1000, divergences: 0, maxRhat: rhat, minEssBulk: ess, minEssTail: ess });
      const rule = (s: string) => v.rules.find((r) => r.rule.startsWith(s))!.passed;
      expect(rule('chains agree closely')).toBe(!rhatFails(rhat));
      expect(rule('enough draws in the bulk')).toBe(!essFails(ess, 4));
    }
  });
  it('flags ESS below 100 per chain', () => {
    expect(essFails(400, 4)).toBe(false);
    expect(essFails(399, 4)).toBe(true);
    expect(essFails(150, 1)).toBe(false);
  });
});
