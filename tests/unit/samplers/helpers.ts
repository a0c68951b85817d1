/**
 * Helpers for the sampler tests: run a few chains, pull out one coordinate, and compare a mean or a
 * variance with its known value within 4 Monte Carlo standard errors of this very run (MCSE from the
 * project's diagnostics: sd / √ESS; Improved R̂, Bayesian Analysis 2021).
 */
import { expect } from 'vitest';
export { runChains, column, type Run } from './run';
import { column, type Run } from './run';
import { mcseMean } from '../../../server/engine/diagnostics';

function pooledMean(ch: Float64Array[]): number {
  let s = 0;
  let n = 0;
  for (const c of ch) for (const v of c) (s += v), n++;
  return s / n;
}

/** |mean − truth| < 4 MCSE. Returns the z-score for reporting. */
export function expectMean(run: Run, j: number, truth: number): number {
  const ch = column(run, j);
  const m = pooledMean(ch);
  const se = mcseMean(ch);
  expect(Number.isFinite(se) && se > 0).toBe(true);
  expect(Math.abs(m - truth)).toBeLessThan(4 * se);
  return (m - truth) / se;
}

/** Variance check: the mean of (x − true mean)² estimates the variance; compared within 4 MCSE. */
export function expectVariance(run: Run, j: number, trueMean: number, trueVar: number): number {
  const ch = column(run, j, (x) => (x - trueMean) ** 2);
  const m = pooledMean(ch);
  const se = mcseMean(ch);
  expect(Number.isFinite(se) && se > 0).toBe(true);
  expect(Math.abs(m - trueVar)).toBeLessThan(4 * se);
  return (m - trueVar) / se;
}

/** Every draw satisfies every original constraint (to 1e-9 relative). */
export function expectAllFeasible(run: Run): void {
  const { inequalities: I, equalities: E, dim } = run.p.target;
  let bad = 0;
  for (const o of run.outs) {
    const nd = o.draws.length / dim;
    for (let k = 0; k < nd; k++) {
      for (let i = 0; i < I.rows; i++) {
        let s = 0;
        for (let j = 0; j < dim; j++) s += I.A[i * dim + j] * o.draws[k * dim + j];
        if (s > I.b[i] + 1e-9 * (1 + Math.abs(I.b[i]))) bad++;
      }
      for (let i = 0; i < E.rows; i++) {
        let s = 0;
        for (let j = 0; j < dim; j++) s += E.A[i * dim + j] * o.draws[k * dim + j];
        if (Math.abs(s - E.b[i]) > 1e-9 * (1 + Math.abs(E.b[i]))) bad++;
      }
    }
  }
  expect(bad).toBe(0);
}

/** Beta(a, b) mean and variance (handbook formulas; e.g. "Continuous Univariate Distributions", vol. 2 (2nd ed., Wiley 1995), ch. 25). */
export function betaMoments(a: number, b: number): { mean: number; variance: number } {
  return { mean: a / (a + b), variance: (a * b) / ((a + b) ** 2 * (a + b + 1)) };
}
