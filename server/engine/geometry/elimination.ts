/**
 * Sparse elimination of the equalities, for the engines whose cost follows the sparsity of the
 * inequality rows (barrier RHMC's structured metric, linalg/metric.ts).
 *
 * The presolve (geometry/index.ts) writes θ = θ₀ + N z with N an orthonormal null-space basis of
 * E from an SVD: exact and well conditioned, but N is dense, so every inequality row Aθ ≤ b becomes
 * a dense row of A N, and a model with `sum(share) == 1` gets a dense metric. Here one coordinate
 * per equality is eliminated instead (Gauss–Jordan with partial pivoting, "Matrix Computations",
 * Johns Hopkins 2013, §3.2): θ_pivots = e' − R θ_free, so N' = [I; −R] has one entry per free
 * coordinate plus R's entries. For a simplex group R is a row of ones: a bound θⱼ ≥ 0 on a free
 * coordinate stays a one-entry row and only the bound on the eliminated coordinate becomes dense
 * (one row, which the metric takes as a low-rank term). N' spans the same space as N.
 */
import type { LinearSystem } from '../types';
import type { PreparedTarget } from './index';
import { RowMatrix } from '../linalg/sparse';

export interface EliminationBasis {
  /** Particular solution: zero on the free coordinates. */
  theta0: Float64Array;
  /** d × n, row-major (mostly zeros). */
  N: Float64Array;
  n: number;
  /** θ index of free coordinate q. */
  free: number[];
  /** Pivot θ indices (eliminated coordinates). */
  pivots: number[];
}

/**
 * Gauss–Jordan on E θ = e (k × d). Pivot of each row: the column of largest magnitude (ties: the
 * later column). Rows that reduce to zero are dropped (the presolve has already checked they are
 * consistent). Returns null without equalities.
 */
export function eliminationBasis(E: LinearSystem, d: number): EliminationBasis | null {
  if (E.rows === 0) return null;
  const M = Float64Array.from(E.A);
  const rhs = Float64Array.from(E.b);
  const k = E.rows;
  const pivots: number[] = [];
  const pivotRow: number[] = [];
  let scale = 0;
  for (let i = 0; i < k * d; i++) scale = Math.max(scale, Math.abs(M[i]));
  const tol = 1e-12 * Math.max(1, scale) * Math.max(k, d);
  const usedRow = new Uint8Array(k);
  for (let step = 0; step < k; step++) {
    // Largest remaining entry over unused rows: row and column.
    let br = -1;
    let bc = -1;
    let bv = 0;
    for (let r = 0; r < k; r++) {
      if (usedRow[r]) continue;
      for (let c = 0; c < d; c++) {
        const v = Math.abs(M[r * d + c]);
        if (v > tol && v >= bv) {
          bv = v;
          br = r;
          bc = c;
        }
      }
    }
    if (br < 0) break;
    usedRow[br] = 1;
    const piv = M[br * d + bc];
    for (let c = 0; c < d; c++) M[br * d + c] /= piv;
    rhs[br] /= piv;
    M[br * d + bc] = 1;
    for (let r = 0; r < k; r++) {
      if (r === br) continue;
      const f = M[r * d + bc];
      if (f === 0) continue;
      for (let c = 0; c < d; c++) M[r * d + c] -= f * M[br * d + c];
      M[r * d + bc] = 0;
      rhs[r] -= f * rhs[br];
    }
    pivots.push(bc);
    pivotRow.push(br);
  }
  const isPivot = new Uint8Array(d);
  for (const c of pivots) isPivot[c] = 1;
  const free: number[] = [];
  for (let j = 0; j < d; j++) if (!isPivot[j]) free.push(j);
  const n = free.length;
  const theta0 = new Float64Array(d);
  const N = new Float64Array(d * n);
  for (let q = 0; q < n; q++) N[free[q] * n + q] = 1;
  for (let t = 0; t < pivots.length; t++) {
    const r = pivotRow[t];
    theta0[pivots[t]] = rhs[r];
    for (let q = 0; q < n; q++) {
      const v = M[r * d + free[q]];
      if (Math.abs(v) > tol) N[pivots[t] * n + q] = -v;
    }
  }
  return { theta0, N, n, free, pivots };
}

/**
 * The prepared target in the elimination coordinates w (θ = θ₀' + N' w): the same density and
 * region, inequality rows A N' (normalised; always-true rows dropped), start mapping from the
 * presolve's z. Null when there are no equalities (nothing to change).
 */
export function eliminatedTarget(p: PreparedTarget): { q: PreparedTarget; fromZ: (z: Float64Array) => Float64Array } | null {
  const t = p.target;
  const d = t.dim;
  const basis = eliminationBasis(t.equalities, d);
  if (!basis || basis.n !== p.n) return null;
  const { theta0, N, n, free } = basis;
  // Sparse columns of N': for each w coordinate, its (θ index, value) entries.
  const colIdx: number[][] = Array.from({ length: n }, () => []);
  const colVal: number[][] = Array.from({ length: n }, () => []);
  for (let j = 0; j < d; j++)
    for (let q = 0; q < n; q++) {
      const v = N[j * n + q];
      if (v !== 0) colIdx[q].push(j), colVal[q].push(v);
    }
  const I = t.inequalities;
  const rowsA: Float64Array[] = [];
  const rowsB: number[] = [];
  const labels: string[] = [];
  for (let i = 0; i < I.rows; i++) {
    const a = new Float64Array(n);
    let bi = I.b[i];
    for (let j = 0; j < d; j++) bi -= I.A[i * d + j] * theta0[j];
    for (let q = 0; q < n; q++) {
      let s = 0;
      for (let e = 0; e < colIdx[q].length; e++) s += I.A[i * d + colIdx[q][e]] * colVal[q][e];
      a[q] = s;
    }
    let norm = 0;
    for (let q = 0; q < n; q++) norm += a[q] * a[q];
    norm = Math.sqrt(norm);
    if (norm <= 1e-12) continue;
    for (let q = 0; q < n; q++) a[q] /= norm;
    rowsA.push(a);
    rowsB.push(bi / norm);
    labels.push(I.labels[i] ?? `constraint ${i + 1}`);
  }
  const m = rowsA.length;
  const A = new Float64Array(m * n);
  for (let i = 0; i < m; i++) A.set(rowsA[i], i * n);
  const toTheta = (w: Float64Array, out: Float64Array) => {
    out.set(theta0);
    for (let q = 0; q < n; q++) {
      const wq = w[q];
      for (let e = 0; e < colIdx[q].length; e++) out[colIdx[q][e]] += colVal[q][e] * wq;
    }
  };
  const theta = new Float64Array(d);
  const gTheta = new Float64Array(d);
  const logDensity = (w: Float64Array, g: Float64Array) => {
    toTheta(w, theta);
    const l = t.logDensity(theta, gTheta);
    for (let q = 0; q < n; q++) {
      let s = 0;
      for (let e = 0; e < colIdx[q].length; e++) s += colVal[q][e] * gTheta[colIdx[q][e]];
      g[q] = s;
    }
    return l;
  };
  const fromZ = (z: Float64Array) => {
    const th = new Float64Array(d);
    p.toTheta(z, th);
    return Float64Array.from(free, (j) => th[j] - theta0[j]);
  };
  const q: PreparedTarget = {
    target: t,
    n,
    A,
    b: Float64Array.from(rowsB),
    m,
    toTheta,
    logDensity,
    centre: fromZ(p.centre),
    rowLabels: labels,
    bounded: p.bounded,
    // Only the rounded walks use the Dikin factor; the engines run on this target do not.
    dikinL: p.dikinL,
    rows: new RowMatrix(A, m, n),
    theta0,
    N,
    flat: p.flat,
  };
  return { q, fromZ };
}
