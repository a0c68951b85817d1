/**
 * The in-place Cholesky kernel against ml-matrix's CholeskyDecomposition (reference library), and
 * the row-compressed products against dense arithmetic.
 */
import { describe, expect, it } from 'vitest';
import { CholeskyDecomposition, Matrix } from 'ml-matrix';
import { Cholesky, setCholeskyKernel } from '../../../server/engine/linalg/cholesky';
import { RowMatrix } from '../../../server/engine/linalg/sparse';
import { Rng } from '../../../server/engine/rng';

function randomSpd(n: number, rng: Rng): Float64Array {
  const B = Float64Array.from({ length: n * n }, () => rng.normal());
  const G = new Float64Array(n * n);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) {
      let s = i === j ? n : 0;
      for (let k = 0; k < n; k++) s += B[i * n + k] * B[j * n + k];
      G[i * n + j] = s;
    }
  return G;
}

describe('Cholesky', () => {
  it('a matrix with an envelope (banded rows, one dense last row, a dense block) factors like ml-matrix and solves exactly; the factor is reused after another matrix', () => {
    const n = 30;
    const rng = new Rng(17);
    const G = new Float64Array(n * n);
    const set = (i: number, j: number, v: number) => ((G[i * n + j] = v), (G[j * n + i] = v));
    for (let i = 0; i < n; i++) set(i, i, 6 + rng.uniform());
    for (let i = 1; i < n; i++) set(i, i - 1, rng.normal());
    for (let i = 2; i < n; i += 3) set(i, i - 2, 0.5 * rng.normal());
    for (let j = 0; j < n - 1; j++) set(n - 1, j, 0.1 * rng.normal());
    for (let i = 10; i < 15; i++) for (let j = 10; j < i; j++) set(i, j, 0.3 * rng.normal());
    for (let i = 0; i < n; i++) G[(n - 1) * n + (n - 1)] += Math.abs(G[(n - 1) * n + i]);
    const rows = Array.from({ length: n }, (_, i) => Array.from(G.subarray(i * n, i * n + n)));
    const ref = new CholeskyDecomposition(new Matrix(rows)).lowerTriangularMatrix;
    setCholeskyKernel('inplace');
    const c = new Cholesky(n);
    // First a dense matrix, then the banded one: the profile of the earlier factor must not linger.
    expect(c.factor(randomSpd(n, rng))).toBe(true);
    expect(c.factor(G)).toBe(true);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(Math.abs(c.L[i * n + j] - ref.get(i, j))).toBeLessThan(1e-12);
    const b = Float64Array.from({ length: n }, () => rng.normal());
    const x = c.solve(b, new Float64Array(n));
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += G[i * n + j] * x[j];
      expect(Math.abs(s - b[i])).toBeLessThan(1e-11);
    }
  });

  it('in-place factor equals ml-matrix’s lower factor; solve, log det and L·x agree', () => {
    const n = 12;
    const rng = new Rng(4);
    const G = randomSpd(n, rng);
    const rows = Array.from({ length: n }, (_, i) => Array.from(G.subarray(i * n, i * n + n)));
    const ref = new CholeskyDecomposition(new Matrix(rows)).lowerTriangularMatrix;
    for (const kernel of ['inplace', 'ml-matrix'] as const) {
      setCholeskyKernel(kernel);
      const c = new Cholesky(n);
      expect(c.factor(G)).toBe(true);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(c.L[i * n + j]).toBeCloseTo(ref.get(i, j), 10);
      const b = Float64Array.from({ length: n }, () => rng.normal());
      const x = c.solve(b, new Float64Array(n));
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let j = 0; j < n; j++) s += G[i * n + j] * x[j];
        expect(s).toBeCloseTo(b[i], 9);
      }
      let ld = 0;
      for (let i = 0; i < n; i++) ld += 2 * Math.log(ref.get(i, i));
      expect(c.logDet()).toBeCloseTo(ld, 10);
    }
    setCholeskyKernel('inplace');
  });

  it('reports an indefinite matrix', () => {
    const c = new Cholesky(2);
    expect(c.factor(Float64Array.from([1, 2, 2, 1]))).toBe(false);
  });
});

describe('RowMatrix', () => {
  it('A x, Aᵀ y and Aᵀ diag(w) A + diag(d) match dense arithmetic', () => {
    const m = 5;
    const n = 4;
    const rng = new Rng(9);
    const A = Float64Array.from({ length: m * n }, () => (rng.uniform() < 0.5 ? 0 : rng.normal()));
    const R = new RowMatrix(A, m, n);
    const x = Float64Array.from({ length: n }, () => rng.normal());
    const y = Float64Array.from({ length: m }, () => rng.normal());
    const w = Float64Array.from({ length: m }, () => rng.uniform());
    const d = Float64Array.from({ length: n }, () => rng.uniform());
    const Ax = R.mul(x, new Float64Array(m));
    const Aty = R.mulT(y, new Float64Array(n));
    const G = R.gram(w, d, new Float64Array(n * n));
    for (let i = 0; i < m; i++) {
      let s = 0;
      for (let j = 0; j < n; j++) s += A[i * n + j] * x[j];
      expect(Ax[i]).toBeCloseTo(s, 12);
    }
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = 0; i < m; i++) s += A[i * n + j] * y[i];
      expect(Aty[j]).toBeCloseTo(s, 12);
      for (let k = 0; k < n; k++) {
        let g = j === k ? d[j] : 0;
        for (let i = 0; i < m; i++) g += A[i * n + j] * w[i] * A[i * n + k];
        expect(G[j * n + k]).toBeCloseTo(g, 12);
      }
    }
  });
});
