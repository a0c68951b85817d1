import { createRequire } from 'node:module';
import { expect } from 'vitest';

/** The parts of jStat (npm `jstat`, a general-purpose statistics library) the tests use. */
export interface JStat {
  gammaln(x: number): number;
  combinationln(n: number, k: number): number;
  normal: { pdf(x: number, mean: number, sd: number): number };
  studentt: { pdf(x: number, dof: number): number };
  cauchy: { pdf(x: number, local: number, scale: number): number };
  laplace: { pdf(x: number, mu: number, b: number): number };
  lognormal: { pdf(x: number, mu: number, sigma: number): number };
  gamma: { pdf(x: number, shape: number, scale: number): number };
  exponential: { pdf(x: number, rate: number): number };
  beta: { pdf(x: number, a: number, b: number): number };
  poisson: { pdf(k: number, lambda: number): number };
  binomial: { pdf(k: number, n: number, p: number): number };
}

/** jstat ships no type declarations; load it through require with the subset typed above. */
export const jStat = createRequire(import.meta.url)('jstat') as JStat;

/**
 * Asserts a ≈ b: equal when either is non-finite (same infinity, or both NaN), otherwise
 * |a − b| ≤ rel·max(1, |b|).
 */
export function expectClose(a: number, b: number, rel: number, what: string): void {
  if (!Number.isFinite(a) || !Number.isFinite(b)) {
    expect(Object.is(a, b) || (Number.isNaN(a) && Number.isNaN(b)) || a === b, `${what}: ${a} vs ${b}`).toBe(true);
    return;
  }
  const err = Math.abs(a - b) / Math.max(1, Math.abs(b));
  expect(err, `${what}: ${a} vs ${b}`).toBeLessThanOrEqual(rel);
}

/**
 * Derivative of f at x by central differences with one Richardson extrapolation step
 * (D(h) and D(h/2) combined as (4·D(h/2) − D(h))/3, error O(h⁴); a standard numerical-analysis
 * device, e.g. the Richardson-extrapolation section of any numerical-analysis textbook).
 */
export function centralDiff(f: (x: number) => number, x: number, h: number): number {
  const d1 = (f(x + h) - f(x - h)) / (2 * h);
  const d2 = (f(x + h / 2) - f(x - h / 2)) / h;
  return (4 * d2 - d1) / 3;
}

/** Relative error of an analytic partial against a numeric one, with an absolute floor. */
export function expectPartial(analytic: number, numeric: number, what: string, rel = 1e-6, floor = 1e-8): void {
  expect(Number.isFinite(analytic), `${what}: analytic partial ${analytic}`).toBe(true);
  const err = Math.abs(analytic - numeric);
  expect(err, `${what}: analytic ${analytic}, numeric ${numeric}`).toBeLessThanOrEqual(rel * Math.abs(numeric) + floor);
}
