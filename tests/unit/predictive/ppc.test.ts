/**
 * Predictive checks through compiled `replicate` statements, with draws taken INDEPENDENTLY from
 * the exact conjugate posterior or from the prior (no MCMC), so every p-value is known in closed
 * form or in distribution:
 *  - statistics against jStat (npm `jstat`: mean, stdev, min, max, median, percentile — the
 *    inclusive percentile is the linear interpolation at h = (n − 1)p);
 *  - the PRIOR predictive p-value of the mean is uniform over data sets drawn from the model
 *    (probability integral transform, common practice): KS distance below the asymptotic critical
 *    value 1.628/√m at level 0.01 (Kolmogorov distribution);
 *  - the POSTERIOR predictive p-value of the mean of a normal model equals the closed form
 *    1 − Φ((ȳ − μ_n)/√(σ²/n + τ_n²)) (normal model with known variance, "Bayesian Data Analysis",
 *    3rd ed., section 2.5) within 4 binomial MCSE, and is NOT uniform: it concentrates near 0.5
 *    (same book, section 6.3), so its spread is far below a uniform's sd 1/√12;
 *  - deliberately wrong models give extreme p-values.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import stdNormal from '@stdlib/stats-base-dists-normal';
import { compileProgram } from '../../../server/engine/compile/index';
import { compileReplicates } from '../../../server/engine/compile/predictive';
import { generatorsFor } from '../../../server/engine/predictive/generators';
import { checkStatistic, predictiveCheck, statistic } from '../../../server/engine/predictive/ppc';
import { Rng } from '../../../server/engine/rng';
import type { DataTables } from '../../../server/engine/types';

type F = (...a: number[]) => number;
// eslint-disable-next-line @typescript-eslint/no-explicit-any
const jStat = (createRequire(import.meta.url)('jstat') as { jStat: Record<string, (...a: any[]) => number> }).jStat;
const normalCdf = stdNormal.cdf as F;

function table(cols: Record<string, Float64Array>, category?: { name: string; values: Float64Array; levels: string[] }): DataTables {
  const columns: DataTables[string]['columns'] = {};
  let rows = 0;
  for (const [k, v] of Object.entries(cols)) {
    columns[k] = { type: v.every((x) => Number.isInteger(x)) ? 'integer' : 'numeric', values: v };
    rows = v.length;
  }
  if (category) columns[category.name] = { type: 'category', values: category.values, levels: category.levels };
  return { d: { rows, columns } };
}

const NORMAL_MODEL = `table d
unknown theta
term ld_normal(y, theta, 1)
term ld_normal(theta, 0, TAU)
replicate y_new = ld_normal(y, theta, 1)`;

/** Replicated data sets from draws of theta (one replicate per draw). */
function replicateFrom(src: string, tables: DataTables, thetas: number[][], seed: number): Float64Array[] {
  const m = compileProgram(src, tables);
  const rep = compileReplicates(m.check, tables)!;
  const rng = new Rng(seed);
  return thetas.map((t) => rep.simulate(Float64Array.from(t), rng)[0]);
}

function ksUniform(p: number[]): number {
  const s = p.slice().sort((a, b) => a - b);
  let d = 0;
  s.forEach((v, i) => (d = Math.max(d, (i + 1) / s.length - v, v - i / s.length)));
  return d;
}

describe('statistics', () => {
  const x = Float64Array.of(3, 0, 7.5, 1.25, 0, 9, 4, 2.5);
  const arr = Array.from(x);
  it.each([
    ['mean', jStat.mean(arr)],
    ['sd', jStat.stdev(arr, 1 as never)],
    ['min', jStat.min(arr)],
    ['max', jStat.max(arr)],
    ['median', jStat.median(arr)],
    // (jStat 1.9.6 stops interpolating between the two largest values, so the check stays below them)
    ['q0.6', jStat.percentile(arr, 0.6, 0 as never)],
    ['q0.15', jStat.percentile(arr, 0.15, 0 as never)],
    ['iqr', jStat.percentile(arr, 0.75, 0 as never) - jStat.percentile(arr, 0.25, 0 as never)],
    ['zeros', 2 / 8],
    ['above:3', 3 / 8],
    ['below:1.25', 2 / 8],
  ])('%s matches the reference', (name, want) => {
    expect(statistic(name as string).of(x)).toBeCloseTo(want as number, 12);
  });
  it('rejects an unknown statistic with the list of names', () => {
    expect(() => statistic('q2')).toThrow(/use mean, sd/);
    expect(() => statistic('skew')).toThrow(/above:10/);
  });
  it('counts ties half in the p-value', () => {
    const c = checkStatistic(statistic('min'), [0, 1], [Float64Array.of(0, 2), Float64Array.of(1, 3), Float64Array.of(-1, 0)]);
    expect(c.p).toBeCloseTo((1 + 0.5) / 3, 12);
  });
});

describe('calibration under a correctly specified model', () => {
  const n = 10;
  const tau0 = 2;
  const src = NORMAL_MODEL.replace('TAU', String(tau0));
  const S = 400;
  const datasets = 150;

  it('prior predictive p-values of the mean are uniform (KS at level 0.01)', () => {
    const rng = new Rng(2024);
    const g = generatorsFor(rng);
    const ps: number[] = [];
    for (let j = 0; j < datasets; j++) {
      const truth = g.ld_normal(0, tau0);
      const y = Float64Array.from({ length: n }, () => g.ld_normal(truth, 1));
      const prior = Array.from({ length: S }, () => [g.ld_normal(0, tau0)]);
      const reps = replicateFrom(src, table({ y }), prior, 100 + j);
      ps.push(checkStatistic(statistic('mean'), y, reps).p);
    }
    expect(ksUniform(ps)).toBeLessThan(1.628 / Math.sqrt(datasets));
  });

  it('posterior predictive p-values of the mean match the closed form and concentrate near 0.5', () => {
    const rng = new Rng(2025);
    const g = generatorsFor(rng);
    const ps: number[] = [];
    for (let j = 0; j < datasets; j++) {
      const truth = g.ld_normal(0, tau0);
      const y = Float64Array.from({ length: n }, () => g.ld_normal(truth, 1));
      const ybar = y.reduce((a, b) => a + b, 0) / n;
      const prec = 1 / (tau0 * tau0) + n;
      const mun = (n * ybar) / prec;
      const post = Array.from({ length: S }, () => [g.ld_normal(mun, 1 / Math.sqrt(prec))]);
      const reps = replicateFrom(src, table({ y }), post, 500 + j);
      const p = checkStatistic(statistic('mean'), y, reps).p;
      ps.push(p);
      if (j < 10) {
        const exact = 1 - normalCdf((ybar - mun) / Math.sqrt(1 / n + 1 / prec), 0, 1);
        expect(Math.abs(p - exact)).toBeLessThan(4 * Math.sqrt((exact * (1 - exact)) / S) + 0.5 / S);
      }
    }
    const mean = ps.reduce((a, b) => a + b, 0) / ps.length;
    const sd = Math.sqrt(ps.reduce((a, b) => a + (b - mean) * (b - mean), 0) / (ps.length - 1));
    expect(Math.abs(mean - 0.5)).toBeLessThan(0.05);
    expect(sd).toBeLessThan(0.5 / Math.sqrt(12));
  });
});

describe('deliberately wrong models', () => {
  it('a Poisson model of overdispersed counts: the sd and the share of zeros are extreme', () => {
    const rng = new Rng(7);
    const g = generatorsFor(rng);
    const n = 60;
    // counts from a gamma mixture of Poisson rates (shape 0.5, rate 0.1: mean 5, many zeros)
    const y = Float64Array.from({ length: n }, () => g.ld_poisson(g.ld_gamma(0.5, 0.1)));
    const src = `table d
unknown lam
term ld_poisson(y, lam) + ld_gamma(lam, 1, 0.1)
constrain lam >= 0
replicate y_new = ld_poisson(y, lam)`;
    // conjugate posterior Gamma(1 + Σy, 0.1 + n)
    const sum = y.reduce((a, b) => a + b, 0);
    const post = Array.from({ length: 1000 }, () => [g.ld_gamma(1 + sum, 0.1 + n)]);
    const tables = table({ y });
    const reps = replicateFrom(src, tables, post, 8);
    const c = predictiveCheck('y_new', y, reps, ['mean', 'sd', 'zeros'].map(statistic));
    const byStat = Object.fromEntries(c.checks.map((x) => [x.stat, x.p]));
    expect(byStat.sd).toBeLessThan(0.01);
    expect(byStat.zeros).toBeLessThan(0.01);
    expect(byStat.mean).toBeGreaterThan(0.05); // the mean is fitted
    expect(byStat.mean).toBeLessThan(0.95);
  });

  it('a prior that contradicts the data: the mean is extreme', () => {
    const rng = new Rng(8);
    const g = generatorsFor(rng);
    const y = Float64Array.from({ length: 20 }, () => g.ld_normal(1, 1));
    const n = 20;
    const mu0 = -5;
    const tau0 = 0.1;
    const prec = 1 / (tau0 * tau0) + n;
    const mun = (mu0 / (tau0 * tau0) + y.reduce((a, b) => a + b, 0)) / prec;
    const post = Array.from({ length: 1000 }, () => [g.ld_normal(mun, 1 / Math.sqrt(prec))]);
    const src = NORMAL_MODEL.replace('ld_normal(theta, 0, TAU)', `ld_normal(theta, ${mu0}, ${tau0})`);
    const reps = replicateFrom(src, table({ y }), post, 9);
    // observed mean far above every replicate: p = Pr(T_rep > T_obs) ≈ 0
    expect(checkStatistic(statistic('mean'), y, reps).p).toBeLessThan(0.01);
  });

  it('per group: a model that ignores a category column is checked by it', () => {
    const rng = new Rng(10);
    const g = generatorsFor(rng);
    const n = 40;
    const grp = Float64Array.from({ length: n }, (_, i) => 1 + (i % 2));
    const y = Float64Array.from(grp, (k) => g.ld_normal(k === 1 ? 0 : 4, 1));
    const src = `table d
unknown theta, sigma
term ld_normal(y, theta, sigma)
term ld_normal(theta, 0, 10) + ld_halfnormal(sigma, 5)
constrain sigma >= 0
replicate y_new = ld_normal(y, theta, sigma)`;
    const tables = table({ y }, { name: 'grp', values: grp, levels: ['low', 'high'] });
    const m = compileProgram(src, tables);
    const rep = compileReplicates(m.check, tables)!;
    expect(rep.specs[0].groups.map((x) => x.column)).toEqual(['grp']);
    // approximate posterior draws: theta near the pooled mean, sigma near the pooled sd (the
    // point here is the grouping, not the posterior)
    const ybar = y.reduce((a, b) => a + b, 0) / n;
    const sd = statistic('sd').of(y);
    const reps = Array.from({ length: 500 }, () => rep.simulate(Float64Array.of(g.ld_normal(ybar, sd / Math.sqrt(n)), sd), rng)[0]);
    const c = predictiveCheck('y_new', y, reps, [statistic('mean')], rep.specs[0].groups);
    expect(c.groups.map((x) => [x.level, x.rows])).toEqual([['low', 20], ['high', 20]]);
    expect(c.groups[0].checks[0].p).toBeGreaterThan(0.99);
    expect(c.groups[1].checks[0].p).toBeLessThan(0.01);
    expect(c.checks[0].p).toBeGreaterThan(0.05);
    expect(c.checks[0].p).toBeLessThan(0.95);
  });
});
