/**
 * The comparison behind the compare cell (server/engine/evidence/compare.ts).
 *
 * Truth values: with normal data of known standard deviation σ and independent normal priors
 * N(0, τ²) on the means, the marginal likelihood is the multivariate normal density
 * y ~ N(0, σ² I + τ² X Xᵀ), X the design (conjugate normal model, "Bayesian Data Analysis", 3rd ed.,
 * CRC Press 2013, ch. 2–3; determinant and inverse by ml-matrix). The prior mass of an ordering of
 * three exchangeable means is 1/3! (symmetry, common practice). Tolerances: 4 reported standard
 * errors (independent replicates), fixed seeds.
 *
 * Also: posterior probabilities follow Bayes' rule with the stated prior odds, the hypothesis row
 * agrees with the rows it compares, and the evidence command with the same seed prints the same
 * log Bayes factor as the job's computation.
 */
import { describe, expect, it } from 'vitest';
import { Matrix, determinant, inverse } from 'ml-matrix';
import { computeComparison, factorWords, readingOf, SEED_STRIDE, type CompareInput } from '../../../server/engine/evidence/compare';
import { main } from '../../../server/engine/cli/evidence';
import type { DataTables } from '../../../server/engine/types';
import { memoryIo } from '../fit/memory-io';

const y = [0.1, -0.4, 0.5, 0.9, 1.2, 1.0];
const g = [1, 1, 2, 2, 3, 3];
const CSV = 'y,g\n' + y.map((v, i) => `${v},${'abc'[g[i] - 1]}`).join('\n') + '\n';
const tables: DataTables = {
  d: {
    rows: 6,
    columns: {
      y: { type: 'numeric', values: Float64Array.from(y) },
      g: { type: 'category', values: Float64Array.from(g), levels: ['a', 'b', 'c'] },
    },
  },
};
const ORDERED = 'table d\nunknown mu[3]\nterm ld_normal(y, mu[g], 1)\nterm ld_normal(mu, 0, 2)\nconstrain mu[1] <= mu[2] <= mu[3]\n';
const ONE_MEAN = 'table d\nunknown m\nterm ld_normal(y, m, 1)\nterm ld_normal(m, 0, 2)\n';

/** log N(y; 0, σ² I + τ² X Xᵀ) (handbook formula). */
function logMarginal(X: number[][], sigma: number, tau: number): number {
  const n = y.length;
  const S = Matrix.eye(n, n).mul(sigma * sigma).add(new Matrix(X).mmul(new Matrix(X).transpose()).mul(tau * tau));
  const v = Matrix.columnVector(y);
  const quad = v.transpose().mmul(inverse(S)).mmul(v).get(0, 0);
  return -0.5 * (n * Math.log(2 * Math.PI) + Math.log(determinant(S)) + quad);
}
const groupsX = g.map((k) => [1, 2, 3].map((j) => (j === k ? 1 : 0)));
const oneX = g.map(() => [1]);

const input = (over: Partial<CompareInput> = {}): CompareInput => ({
  models: [
    { cellId: 'ordered', label: 'Ordered means', source: ORDERED, tables, tableIds: { d: 'x' }, fit: null },
    { cellId: 'one', label: 'One mean', source: ONE_MEAN, tables, tableIds: { d: 'x' }, fit: null },
  ],
  hypotheses: [{ modelCellId: 'ordered', lines: [5] }],
  reference: { modelCellId: 'one', without: [] },
  priorOdds: [{ key: { modelCellId: 'one', without: [] }, odds: 3 }],
  replicates: 4,
  seed: 41,
  factors: [1],
  ...over,
});

describe('comparison of models and hypotheses', { timeout: 120_000 }, () => {
  const r = computeComparison(input());
  const row = (id: string, without: number[] = []) => r.entries.find((e) => e.key.modelCellId === id && e.key.without.join() === without.join())!;

  it('log marginal likelihoods match the conjugate normal formula', () => {
    const free = row('ordered', [5]);
    const one = row('one');
    expect(Math.abs(free.logML.value - logMarginal(groupsX, 1, 2))).toBeLessThanOrEqual(4 * free.logML.se);
    expect(Math.abs(one.logML.value - logMarginal(oneX, 1, 2))).toBeLessThanOrEqual(4 * one.logML.se);
    // Against the reference: differences with root-sum-square standard errors.
    expect(free.logBF).toBeCloseTo(free.logML.value - one.logML.value, 12);
    expect(free.logBFSe).toBeCloseTo(Math.hypot(free.logML.se, one.logML.se), 12);
    expect(free.logBFInterval![1] - free.logBFInterval![0]).toBeCloseTo(2 * 1.959964 * free.logBFSe!, 5);
    expect(one.logBF).toBeNull();
  });

  it('the tested ordering has prior mass 1/3!, and its Bayes factor is the ratio of its two rows', () => {
    const h = r.hypotheses[0];
    expect(Math.abs(h.logPriorMass.value + Math.log(6))).toBeLessThanOrEqual(4 * h.logPriorMass.se); // 1/3!
    expect(h.logBF).toBeCloseTo(h.logPosteriorMass.value - h.logPriorMass.value, 12);
    const withRow = row('ordered');
    const without = row('ordered', [5]);
    expect(h.logBF).toBeCloseTo(withRow.logML.value - without.logML.value, 9);
    expect(h.lineText).toEqual(['constrain mu[1] <= mu[2] <= mu[3]']);
    expect(h.reading).toMatch(/by a factor of about/);
  });

  it('posterior probabilities follow the stated prior odds', () => {
    const w = r.entries.map((e) => Math.log(e.priorOdds) + e.logML.value);
    const m = Math.max(...w);
    const total = w.reduce((s, x) => s + Math.exp(x - m), 0);
    r.entries.forEach((e, i) => expect(e.posteriorProbability).toBeCloseTo(Math.exp(w[i] - m) / total, 12));
    expect(row('one').priorOdds).toBe(3);
    expect(r.entries.reduce((s, e) => s + e.posteriorProbability, 0)).toBeCloseTo(1, 12);
  });

  it('without fits there is no leave-one-out, and the result says why', () => {
    expect(row('ordered').loo).toBeNull();
    expect(row('ordered').looNote).toMatch(/Fit this model/);
    expect(r.looReference).toBeNull();
    expect(r.caution).toMatch(/depend on the priors/);
  });

  it('the evidence command gives the same log Bayes factor for the same seed', async () => {
    const io = memoryIo({ 'ordered.slk': ORDERED, 'd.csv': CSV });
    const seed = 41 + SEED_STRIDE * 0;
    expect(await main(['ordered.slk', '--data', 'd.csv', '--hypothesis', '5', '--seed', String(seed), '--replicates', '4', '--json'], io)).toBe(0);
    const out = JSON.parse(io.out);
    // The command prints six significant digits.
    expect(out.hypothesis.logBF).toBe(Number(r.hypotheses[0].logBF.toPrecision(6)));
    expect(out.hypothesis.se).toBe(Number(r.hypotheses[0].se.toPrecision(6)));
  });

  it('the sensitivity run scales the priors and keeps the seeds; the command agrees at ×2', async () => {
    const s = computeComparison(input({ factors: [2], hypotheses: [{ modelCellId: 'ordered', lines: [5] }], models: input().models.slice(0, 1), reference: null, priorOdds: [] }));
    expect(s.factors).toEqual([1, 2]);
    const h = s.hypotheses[0];
    expect(h.sensitivity.map((x) => x.factor)).toEqual([1, 2]);
    // Conjugate formula with τ = 4 for the unordered row at ×2.
    const free = s.entries.find((e) => e.key.without.length)!;
    const at2 = free.sensitivity.find((x) => x.factor === 2)!;
    expect(Math.abs(at2.logML - logMarginal(groupsX, 1, 4))).toBeLessThanOrEqual(4 * at2.se);
    expect(s.priorScales[0].lines[0].scaled).toEqual(['ld_normal (scale 2 × 2)']);
    const io = memoryIo({ 'ordered.slk': ORDERED, 'd.csv': CSV });
    expect(await main(['ordered.slk', '--data', 'd.csv', '--hypothesis', '5', '--seed', '41', '--replicates', '4', '--prior-scale', '2', '--json'], io)).toBe(0);
    expect(JSON.parse(io.out).hypothesis.logBF).toBe(Number(h.sensitivity[1].logBF.toPrecision(6)));
  });

  it('reads a factor in words', () => {
    expect(factorWords(Math.log(12.3))).toBe('12');
    expect(factorWords(-Math.log(3.14))).toBe('3.1');
    expect(factorWords(Math.log(1e5))).toBe('1.0 × 10^5');
    expect(readingOf('A', 'B', -2, 0.1)).toMatch(/favour B over A by a factor of about 7\.4/);
    expect(readingOf('A', 'B', 0.1, 0.2)).toMatch(/either direction/);
  });
});
