import { describe, expect, it } from 'vitest';
import { formatEss, formatEstimate, formatRhat, formatSeconds } from '../../../../src/lib/estimates';
import { essFails, rhatFails } from '../../../../src/lib/diagnostic-thresholds';

describe('formatting', () => {
  it('keeps three significant digits and a true minus sign', () => {
    expect(formatEstimate(3.14159)).toBe('3.14');
    expect(formatEstimate(-0.012345)).toBe('−0.0123');
    expect(formatEstimate(1234.5)).toBe('1230');
    expect(formatEstimate(123456)).toBe('1.23e5');
    expect(formatEstimate(0.0000123)).toBe('1.23e-5');
    expect(formatEstimate(0)).toBe('0');
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

describe('failing thresholds (Improved R̂, Bayesian Analysis 2021: R̂ < 1.01, ESS ≥ 100 per chain)', () => {
  it('flags R̂ at or above 1.01 and non-finite R̂', () => {
    expect(rhatFails(1.009)).toBe(false);
    expect(rhatFails(1.01)).toBe(true);
    expect(rhatFails(NaN)).toBe(true);
  });
  it('flags ESS below 100 per chain', () => {
    expect(essFails(400, 4)).toBe(false);
    expect(essFails(399, 4)).toBe(true);
    expect(essFails(150, 1)).toBe(false);
  });
});
