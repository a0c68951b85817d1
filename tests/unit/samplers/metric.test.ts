/**
 * The structured factorisations of G = Aᵀ diag(w) A + diag(λ) (server/engine/linalg/metric.ts)
 * against the dense Cholesky path on random instances: solves, log det and row leverages
 * aᵢᵀ G⁻¹ aᵢ agree to 1e-10 (relative). The dense path is itself checked against ml-matrix in
 * cholesky.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { detectStructure, makeMetricFactor, type MetricKind } from '../../../server/engine/linalg/metric';
import { RowMatrix } from '../../../server/engine/linalg/sparse';
import { Rng } from '../../../server/engine/rng';

type Pattern = (n: number, rng: Rng) => number[][];

const box: Pattern = (n, rng) => {
  const out: number[][] = [];
  for (let j = 0; j < n; j++) {
    const a = new Array(n).fill(0);
    a[j] = -1 - rng.uniform();
    out.push(a);
    const b = new Array(n).fill(0);
    b[j] = 1 + rng.uniform();
    out.push(b);
  }
  return out;
};
const simplex: Pattern = (n) => {
  const out: number[][] = [];
  for (let j = 0; j < n; j++) {
    const a = new Array(n).fill(0);
    a[j] = -1;
    out.push(a);
  }
  out.push(new Array(n).fill(1 / Math.sqrt(n)));
  return out;
};
const order: Pattern = (n) => {
  const out: number[][] = [];
  const first = new Array(n).fill(0);
  first[0] = -1;
  out.push(first);
  for (let j = 0; j + 1 < n; j++) {
    const a = new Array(n).fill(0);
    a[j] = Math.SQRT1_2;
    a[j + 1] = -Math.SQRT1_2;
    out.push(a);
  }
  const last = new Array(n).fill(0);
  last[n - 1] = 1;
  out.push(last);
  return out;
};
/** Second differences (convexity) plus two budget rows over random subsets. */
const convexBudget: Pattern = (n, rng) => {
  const out: number[][] = [];
  for (let j = 0; j + 2 < n; j++) {
    const a = new Array(n).fill(0);
    a[j] = -1;
    a[j + 1] = 2;
    a[j + 2] = -1;
    out.push(a);
  }
  for (let r = 0; r < 2; r++) out.push(Array.from({ length: n }, () => (rng.uniform() < 0.6 ? rng.uniform() : 0)));
  for (let j = 0; j < n; j++) {
    const a = new Array(n).fill(0);
    a[j] = -1;
    out.push(a);
  }
  return out;
};

function build(rowsArr: number[][], n: number): RowMatrix {
  const A = new Float64Array(rowsArr.length * n);
  rowsArr.forEach((r, i) => A.set(r, i * n));
  return new RowMatrix(A, rowsArr.length, n);
}

const cases: [string, Pattern, MetricKind][] = [
  ['box (bounds only)', box, 'diagonal'],
  ['simplex', simplex, 'diagonal+low-rank'],
  ['order simplex', order, 'banded'],
  ['second differences with budget rows', convexBudget, 'banded+low-rank'],
];

describe.each(cases)('%s', (_name, pattern, kind) => {
  it.each([8, 17, 40])(`n = %i: the ${kind} factor matches the dense one to 1e-10`, (n) => {
    const rng = new Rng(1000 + n);
    const rows = build(pattern(n, rng), n);
    const st = detectStructure(rows, 'structured');
    expect(st.kind).toBe(kind);
    const fs = makeMetricFactor(rows, st);
    const fd = makeMetricFactor(rows, detectStructure(rows, 'dense'));
    for (let trial = 0; trial < 3; trial++) {
      // Weights spanning several orders of magnitude, like 1/s² near and far from the faces.
      const w = Float64Array.from({ length: rows.m }, () => Math.exp(6 * rng.uniform() - 2));
      const lam = Float64Array.from({ length: n }, () => 0.01 + rng.uniform());
      expect(fs.factor(w, lam)).toBe(true);
      expect(fd.factor(w, lam)).toBe(true);
      const ld = fd.logDet();
      expect(Math.abs(fs.logDet() - ld)).toBeLessThan(1e-10 * Math.max(1, Math.abs(ld)));
      const rhs = Float64Array.from({ length: n }, () => rng.normal());
      const xs = fs.solve(rhs, new Float64Array(n));
      const xd = fd.solve(rhs, new Float64Array(n));
      const xmax = Math.max(...Array.from(xd, Math.abs));
      for (let j = 0; j < n; j++) expect(Math.abs(xs[j] - xd[j])).toBeLessThan(1e-10 * xmax);
      const ls = fs.leverages(new Float64Array(rows.m));
      const ldn = fd.leverages(new Float64Array(rows.m));
      for (let i = 0; i < rows.m; i++) expect(Math.abs(ls[i] - ldn[i])).toBeLessThan(1e-10 * Math.max(1e-3, ldn[i]));
    }
  });
});

describe('automatic choice of structure', () => {
  it('picks the structured kinds for the patterns above at n = 50 and dense for dense rows', () => {
    const rng = new Rng(3);
    for (const [, pattern, kind] of cases) expect(detectStructure(build(pattern(50, rng), 50)).kind).toBe(kind);
    const denseRows = Array.from({ length: 60 }, () => Array.from({ length: 20 }, () => rng.normal()));
    expect(detectStructure(build(denseRows, 20)).kind).toBe('dense');
  });
});
