/**
 * Geometry of the constrained region: presolve, interior start, dispersed chain starts.
 * Pure numerics: no Express, no database.
 *
 * Presolve (DESIGN §6.1): equalities E θ = e become θ = θ₀ + N z with N an orthonormal basis of the
 * null space of E (ml-matrix SVD); inequalities are rewritten in z, zero rows are dropped (or
 * reported when they can never hold), rows are normalised to unit length, duplicates are merged
 * (tightest bound kept), and pairs of opposite rows that pin the region to a hyperplane are reported.
 * A barrier phase-1 problem (maximise the common slack t of A z + t ≤ b) finds an interior point or
 * proves there is none; its dual weights name the rows that conflict.
 */
import { Matrix, SVD } from 'ml-matrix';
import type { LinearSystem, ModelTarget } from '../types';
import { Rng } from '../rng';
import { Cholesky } from '../linalg/cholesky';
import { RowMatrix } from '../linalg/sparse';
import { hitRunStep, makeHitRunState } from '../samplers/hitrun';

/** The constraints cannot all hold (or have no interior). `conflicting` lists the rows' labels. */
export class RegionError extends Error {
  conflicting: string[];
  constructor(message: string, conflicting: string[]) {
    super(message);
    this.name = 'RegionError';
    this.conflicting = conflicting;
  }
}

/**
 * A target in reduced coordinates z: θ = θ₀ + N z (N an orthonormal null-space basis of E),
 * region {z : A z ≤ b} with rows normalised, duplicates and zero rows removed.
 */
export interface PreparedTarget {
  target: ModelTarget;
  /** Reduced dimension. */
  n: number;
  /** m × n, row-major. */
  A: Float64Array;
  b: Float64Array;
  m: number;
  toTheta(z: Float64Array, out: Float64Array): void;
  /** ℓ in z coordinates; writes ∇_z ℓ into grad (length n). */
  logDensity(z: Float64Array, grad: Float64Array): number;
  /** Strictly interior start (analytic centre, regularised on unbounded regions). */
  centre: Float64Array;
  /** Labels of the kept inequality rows (row i of A). */
  rowLabels: string[];
  /** True when the region {A z ≤ b} is bounded (the unregularised analytic centre exists). */
  bounded: boolean;
  /** Lower Cholesky factor (row-major n × n) of the Dikin matrix Aᵀ S⁻² A (+ ρ I if unbounded) at the centre. */
  dikinL: Float64Array;
  /** First non-zero column of each row of dikinL (its envelope; absent = dense). */
  dikinFirst?: Int32Array;
  /** A in row-compressed form. */
  rows: RowMatrix;
  /** θ₀ and N (dim × n row-major, null when there are no equalities). */
  theta0: Float64Array;
  N: Float64Array | null;
  /** Cached answer of isFlat (computed on first use). */
  flat?: boolean;
}

/** Regulariser of the analytic centre on unbounded regions: minimise −Σ log sᵢ + ½ ρ |z|². */
export const CENTRE_RHO = 1e-2;

const EPS = 1e-9;

function label(sys: LinearSystem, i: number, kind: string): string {
  return sys.labels[i] ?? `${kind} ${i + 1}`;
}

function listLabels(ls: string[]): string {
  const q = ls.map((l) => `"${l}"`);
  if (q.length <= 1) return q.join('');
  return `${q.slice(0, -1).join(', ')} and ${q[q.length - 1]}`;
}

/* ----------------------------------------------------------------------------------------------- */
/* Equalities                                                                                     */
/* ----------------------------------------------------------------------------------------------- */

interface EqReduction {
  theta0: Float64Array;
  N: Float64Array | null;
  n: number;
}

/** Least-squares solution and residual of the rows `sel` of E θ = e, plus the null-space basis. */
function solveEqualities(eq: LinearSystem, d: number, sel: number[]): { theta0: Float64Array; residual: number; N: Float64Array; n: number } {
  const k = sel.length;
  const rowsN = Math.max(k, d);
  const M = new Matrix(rowsN, d);
  const rhs = new Float64Array(rowsN);
  let scale = 0;
  for (let r = 0; r < k; r++) {
    const i = sel[r];
    for (let j = 0; j < d; j++) M.set(r, j, eq.A[i * d + j]);
    rhs[r] = eq.b[i];
    scale = Math.max(scale, Math.abs(eq.b[i]));
  }
  // Padding with zero rows to a square (or tall) matrix makes ml-matrix return all d right singular vectors.
  const svd = new SVD(M, { computeLeftSingularVectors: true, computeRightSingularVectors: true, autoTranspose: false });
  const sv = svd.diagonal;
  const U = svd.leftSingularVectors;
  const V = svd.rightSingularVectors;
  const smax = Math.max(0, ...sv);
  const tol = Math.max(rowsN, d) * 1e-12 * Math.max(1, smax);
  const theta0 = new Float64Array(d);
  const nullCols: number[] = [];
  for (let c = 0; c < d; c++) {
    if (sv[c] > tol) {
      let ue = 0;
      for (let r = 0; r < rowsN; r++) ue += U.get(r, c) * rhs[r];
      const coef = ue / sv[c];
      for (let j = 0; j < d; j++) theta0[j] += V.get(j, c) * coef;
    } else nullCols.push(c);
  }
  let residual = 0;
  for (let r = 0; r < k; r++) {
    const i = sel[r];
    let s = -eq.b[i];
    for (let j = 0; j < d; j++) s += eq.A[i * d + j] * theta0[j];
    residual = Math.max(residual, Math.abs(s) / (1 + scale));
  }
  const n = nullCols.length;
  const N = new Float64Array(d * n);
  for (let q = 0; q < n; q++) for (let j = 0; j < d; j++) N[j * n + q] = V.get(j, nullCols[q]);
  return { theta0, residual, N, n };
}

function reduceEqualities(eq: LinearSystem, d: number): EqReduction {
  if (eq.rows === 0) return { theta0: new Float64Array(d), N: null, n: d };
  if (eq.cols !== d) throw new Error(`equality system has ${eq.cols} columns, expected ${d}`);
  const all = Array.from({ length: eq.rows }, (_, i) => i);
  const full = solveEqualities(eq, d, all);
  if (full.residual > 1e-8) {
    // Find a small inconsistent subset: first prefix that fails, then drop rows it does not need.
    let prefix = all;
    for (let i = 1; i <= eq.rows; i++) {
      if (solveEqualities(eq, d, all.slice(0, i)).residual > 1e-8) {
        prefix = all.slice(0, i);
        break;
      }
    }
    let set = prefix;
    if (set.length <= 60) {
      for (const j of prefix.slice(0, -1)) {
        const trial = set.filter((x) => x !== j);
        if (solveEqualities(eq, d, trial).residual > 1e-8) set = trial;
      }
    }
    const labels = set.map((i) => label(eq, i, 'equality'));
    const msg =
      labels.length === 1
        ? `The equality ${listLabels(labels)} can never hold.`
        : `The equalities ${listLabels(labels)} contradict each other: they cannot all hold.`;
    throw new RegionError(msg, labels);
  }
  if (full.n === 0) {
    throw new RegionError(
      'The equality constraints fix every unknown to a single value, so there is nothing left to sample.',
      all.map((i) => label(eq, i, 'equality')),
    );
  }
  return { theta0: full.theta0, N: full.N, n: full.n };
}

/* ----------------------------------------------------------------------------------------------- */
/* Inequalities in reduced coordinates                                                            */
/* ----------------------------------------------------------------------------------------------- */

interface IneqReduction {
  A: Float64Array;
  b: Float64Array;
  m: number;
  labels: string[];
}

function reduceInequalities(ineq: LinearSystem, red: EqReduction, d: number, hasEq: boolean): IneqReduction {
  const n = red.n;
  if (ineq.rows > 0 && ineq.cols !== d) throw new Error(`inequality system has ${ineq.cols} columns, expected ${d}`);
  const rowsA: Float64Array[] = [];
  const rowsB: number[] = [];
  const rowsL: string[] = [];
  const keyOf = new Map<string, number>();
  const quant = (x: number) => (Math.abs(x) < 1e-10 ? '0' : x.toFixed(9));
  const bscale = 1 + ineq.b.reduce((s, v) => Math.max(s, Math.abs(v)), 0);
  for (let i = 0; i < ineq.rows; i++) {
    const a = new Float64Array(n);
    let origNorm = 0;
    for (let j = 0; j < d; j++) origNorm = Math.max(origNorm, Math.abs(ineq.A[i * d + j]));
    let bi = ineq.b[i];
    if (red.N) {
      for (let j = 0; j < d; j++) {
        const aij = ineq.A[i * d + j];
        if (aij === 0) continue;
        bi -= aij * red.theta0[j];
        for (let q = 0; q < n; q++) a[q] += aij * red.N[j * n + q];
      }
    } else for (let j = 0; j < d; j++) a[j] = ineq.A[i * d + j];
    let norm = 0;
    for (let q = 0; q < n; q++) norm += a[q] * a[q];
    norm = Math.sqrt(norm);
    const lab = label(ineq, i, 'constraint');
    if (norm <= 1e-10 * Math.max(1, origNorm)) {
      if (bi < -EPS * bscale) {
        throw new RegionError(
          hasEq
            ? `The constraint "${lab}" cannot hold given the equality constraints.`
            : `The constraint "${lab}" can never hold.`,
          [lab],
        );
      }
      continue; // always true: drop
    }
    for (let q = 0; q < n; q++) a[q] /= norm;
    bi /= norm;
    const key = Array.from(a, quant).join(',');
    const negKey = Array.from(a, (x) => quant(-x)).join(',');
    const same = keyOf.get(key);
    if (same !== undefined) {
      if (bi < rowsB[same]) {
        rowsB[same] = bi;
        rowsL[same] = lab;
      }
      continue;
    }
    const opp = keyOf.get(negKey);
    if (opp !== undefined) {
      const gap = bi + rowsB[opp];
      if (gap < -EPS * bscale) {
        throw new RegionError(`The constraints "${rowsL[opp]}" and "${lab}" cannot both hold.`, [rowsL[opp], lab]);
      }
      if (gap <= EPS * bscale) {
        throw new RegionError(
          `The constraints "${rowsL[opp]}" and "${lab}" cannot both hold strictly: together they force an equality, so the region has no interior. Write them as one equality constraint.`,
          [rowsL[opp], lab],
        );
      }
    }
    keyOf.set(key, rowsA.length);
    rowsA.push(a);
    rowsB.push(bi);
    rowsL.push(lab);
  }
  const m = rowsA.length;
  const A = new Float64Array(m * n);
  for (let i = 0; i < m; i++) A.set(rowsA[i], i * n);
  return { A, b: Float64Array.from(rowsB), m, labels: rowsL };
}

/* ----------------------------------------------------------------------------------------------- */
/* Phase 1: an interior point, or a named conflict                                                */
/* ----------------------------------------------------------------------------------------------- */

/**
 * Barrier method on (z, t): minimise −t/μ − Σ log(bᵢ − aᵢz − t) − log(T − t) + ½ρ|z|² for decreasing μ.
 * Returns a point with min slack > 0, or throws RegionError naming the rows with the largest dual
 * weights λᵢ = μ / rᵢ (an approximate Farkas certificate: λ ≥ 0, Σλ = 1, Aᵀλ ≈ 0, λᵀb ≤ 0).
 */
function phaseOne(A: Float64Array, b: Float64Array, m: number, n: number, labels: string[]): Float64Array {
  const z = new Float64Array(n);
  let minSlack = Infinity;
  for (let i = 0; i < m; i++) minSlack = Math.min(minSlack, b[i]);
  const bscale = 1 + b.reduce((s, v) => Math.max(s, Math.abs(v)), 0);
  const tolT = 1e-9 * bscale;
  if (minSlack > 1e-3 * bscale) return z;
  const T = 1 * bscale;
  let t = minSlack - 1;
  // Keeps z finite on unbounded regions (the barrier alone would push it off to infinity).
  const rho = 1e-2 / (bscale * bscale);
  const nv = n + 1;
  const H = new Float64Array(nv * nv);
  const g = new Float64Array(nv);
  const dx = new Float64Array(nv);
  const chol = new Cholesky(nv);
  const r = new Float64Array(m);
  const phi = (zz: Float64Array, tt: number, mu: number): number => {
    let f = -tt / mu + 0.5 * rho * dot(zz, zz);
    if (!(T - tt > 0)) return Infinity;
    f -= Math.log(T - tt);
    for (let i = 0; i < m; i++) {
      let s = b[i] - tt;
      for (let q = 0; q < n; q++) s -= A[i * n + q] * zz[q];
      if (!(s > 0)) return Infinity;
      f -= Math.log(s);
    }
    return f;
  };
  const zTrial = new Float64Array(n);
  let mu = 1;
  let provedEmpty = false;
  for (let outer = 0; outer < 60; outer++) {
    for (let it = 0; it < 80; it++) {
      // slacks
      for (let i = 0; i < m; i++) {
        let s = b[i] - t;
        for (let q = 0; q < n; q++) s -= A[i * n + q] * z[q];
        r[i] = s;
      }
      H.fill(0);
      g.fill(0);
      for (let q = 0; q < n; q++) {
        g[q] = rho * z[q];
        H[q * nv + q] = rho;
      }
      g[n] = -1 / mu + 1 / (T - t);
      H[n * nv + n] = 1 / ((T - t) * (T - t));
      for (let i = 0; i < m; i++) {
        const ir = 1 / r[i];
        const ir2 = ir * ir;
        // gradient of −log r wrt (z, t) is (aᵢ, 1)/r
        for (let q = 0; q < n; q++) {
          const aq = A[i * n + q];
          g[q] += aq * ir;
          if (aq === 0) continue;
          for (let p = 0; p <= q; p++) H[q * nv + p] += aq * A[i * n + p] * ir2;
          H[n * nv + q] += aq * ir2;
        }
        g[n] += ir;
        H[n * nv + n] += ir2;
      }
      for (let q = 0; q < nv; q++) for (let p = 0; p < q; p++) H[p * nv + q] = H[q * nv + p];
      if (!chol.factor(H)) {
        for (let q = 0; q < nv; q++) H[q * nv + q] *= 1 + 1e-8;
        if (!chol.factor(H)) break;
      }
      chol.solve(g, dx);
      const dec = dot(g, dx);
      if (dec / 2 < 1e-10) break;
      // backtracking line search on φ, staying strictly feasible
      const f0 = phi(z, t, mu);
      let step = 1;
      for (let ls = 0; ls < 60; ls++) {
        for (let q = 0; q < n; q++) zTrial[q] = z[q] - step * dx[q];
        const tt = t - step * dx[n];
        const f1 = phi(zTrial, tt, mu);
        if (f1 <= f0 - 0.25 * step * dec) {
          z.set(zTrial);
          t = tt;
          break;
        }
        step *= 0.5;
      }
      if (t > tolT && t * 2 > (m + 1) * mu) return z;
    }
    if (t >= 0.5 * T || (t > tolT && t * 2 > (m + 1) * mu)) return z;
    // Upper bound on the best common slack (duality gap of the centred barrier problem).
    const upper = t + (m + 1) * mu;
    if (upper < -tolT && !provedEmpty) provedEmpty = true;
    // Once emptiness is proven, keep lowering μ a little so the dual weights single out the rows
    // that really conflict (inactive rows' weights shrink with μ).
    if ((provedEmpty && mu < 1e-10) || mu < 1e-13) {
      const lambda = new Float64Array(m);
      let lmax = 0;
      for (let i = 0; i < m; i++) {
        let s = b[i] - t;
        for (let q = 0; q < n; q++) s -= A[i * n + q] * z[q];
        lambda[i] = mu / s;
        lmax = Math.max(lmax, lambda[i]);
      }
      const idx = Array.from({ length: m }, (_, i) => i)
        .filter((i) => lambda[i] >= 1e-3 * lmax)
        .sort((i, j) => lambda[j] - lambda[i])
        .sort((i, j) => i - j);
      const names = idx.map((i) => labels[i]);
      if (provedEmpty) {
        throw new RegionError(
          names.length === 2
            ? `The constraints ${listLabels(names)} cannot both hold.`
            : `The constraints ${listLabels(names)} cannot all hold at once.`,
          names,
        );
      }
      throw new RegionError(
        names.length === 2
          ? `The constraints ${listLabels(names)} cannot both hold strictly: the region they leave has no interior (it is flat or a single point). Replace them by the equality they imply.`
          : `The constraints ${listLabels(names)} cannot all hold strictly: the region they leave has no interior (it is flat or a single point). Replace them by the equality they imply.`,
        names,
      );
    }
    mu *= 0.1;
  }
  throw new RegionError('Could not find a point strictly inside the constraints.', []);
}

/* ----------------------------------------------------------------------------------------------- */
/* Analytic centre                                                                                */
/* ----------------------------------------------------------------------------------------------- */

/**
 * Damped Newton on φ(z) = −Σ log(bᵢ − aᵢ z) + ½ ρ |z|² from a strictly interior z (the damped
 * step 1/(1+λ) for self-concordant functions of "Interior-Point Polynomial Algorithms in Convex
 * Programming", SIAM 1994, then full steps).
 * Returns converged = false when the iterate runs off to infinity (unbounded region, ρ = 0).
 */
export function analyticCentre(
  rows: RowMatrix,
  b: Float64Array,
  z0: Float64Array,
  rho: number,
  maxIter = 500,
): { z: Float64Array; converged: boolean; hessL: Float64Array | null } {
  const { m, n } = rows;
  const z = Float64Array.from(z0);
  const s = new Float64Array(m);
  const w = new Float64Array(m);
  const g = new Float64Array(n);
  const H = new Float64Array(n * n);
  const dx = new Float64Array(n);
  const rdiag = new Float64Array(n).fill(rho);
  const chol = new Cholesky(n);
  const trial = new Float64Array(n);
  const slackOk = (zz: Float64Array) => {
    rows.mul(zz, s);
    for (let i = 0; i < m; i++) {
      s[i] = b[i] - s[i];
      if (!(s[i] > 0)) return false;
    }
    return true;
  };
  let zScale = 1 + b.reduce((a, v) => Math.max(a, Math.abs(v)), 0);
  let converged = false;
  for (let it = 0; it < maxIter; it++) {
    if (!slackOk(z)) throw new Error('analytic centre: left the region');
    for (let i = 0; i < m; i++) w[i] = 1 / s[i];
    rows.mulT(w, g);
    for (let q = 0; q < n; q++) g[q] += rho * z[q];
    for (let i = 0; i < m; i++) w[i] = 1 / (s[i] * s[i]);
    rows.gram(w, rdiag, H);
    if (!chol.factor(H)) return { z, converged: false, hessL: null };
    chol.solve(g, dx);
    const lam2 = dot(g, dx);
    if (!Number.isFinite(lam2)) return { z, converged: false, hessL: null };
    if (lam2 < 1e-18) {
      converged = true;
      break;
    }
    const lam = Math.sqrt(lam2);
    let step = lam > 0.25 ? 1 / (1 + lam) : 1;
    for (let ls = 0; ls < 60; ls++) {
      for (let q = 0; q < n; q++) trial[q] = z[q] - step * dx[q];
      if (slackOk(trial)) break;
      step *= 0.5;
    }
    z.set(trial);
    let zmax = 0;
    for (let q = 0; q < n; q++) zmax = Math.max(zmax, Math.abs(z[q]));
    if (zmax > 1e9 * zScale) return { z, converged: false, hessL: null };
  }
  if (!converged) return { z, converged: false, hessL: null };
  slackOk(z);
  for (let i = 0; i < m; i++) w[i] = 1 / (s[i] * s[i]);
  rows.gram(w, rdiag, H);
  chol.factor(H);
  zScale = 0;
  return { z, converged, hessL: Float64Array.from(chol.L) };
}

/* ----------------------------------------------------------------------------------------------- */
/* Public entry points                                                                            */
/* ----------------------------------------------------------------------------------------------- */

interface RegionPrep {
  red: EqReduction;
  ineq: IneqReduction;
  rows: RowMatrix;
  centre: Float64Array;
  bounded: boolean;
  dikinL: Float64Array;
}

function prepareRegion(ineq: LinearSystem, eq: LinearSystem, d: number): RegionPrep {
  const red = reduceEqualities(eq, d);
  const ir = reduceInequalities(ineq, red, d, eq.rows > 0);
  const n = red.n;
  const rows = new RowMatrix(ir.A, ir.m, n);
  if (ir.m === 0) {
    const L = new Float64Array(n * n);
    for (let q = 0; q < n; q++) L[q * n + q] = 1;
    return { red, ineq: ir, rows, centre: new Float64Array(n), bounded: false, dikinL: L };
  }
  const start = phaseOne(ir.A, ir.b, ir.m, n, ir.labels);
  const reg = analyticCentre(rows, ir.b, start, CENTRE_RHO);
  if (!reg.converged || !reg.hessL) throw new Error('analytic centre: Newton iterations did not converge');
  const plain = analyticCentre(rows, ir.b, reg.z, 0);
  if (plain.converged && plain.hessL) {
    return { red, ineq: ir, rows, centre: plain.z, bounded: true, dikinL: plain.hessL };
  }
  return { red, ineq: ir, rows, centre: reg.z, bounded: false, dikinL: reg.hessL };
}

export function prepareTarget(target: ModelTarget): PreparedTarget {
  const d = target.dim;
  const reg = prepareRegion(target.inequalities, target.equalities, d);
  const { red } = reg;
  const n = red.n;
  const N = red.N;
  const theta0 = red.theta0;
  const thetaBuf = new Float64Array(d);
  const gradBuf = new Float64Array(d);
  const toTheta = (z: Float64Array, out: Float64Array) => {
    if (!N) {
      out.set(z);
      return;
    }
    for (let j = 0; j < d; j++) {
      let s = theta0[j];
      const r = j * n;
      for (let q = 0; q < n; q++) s += N[r + q] * z[q];
      out[j] = s;
    }
  };
  const logDensity = (z: Float64Array, grad: Float64Array): number => {
    if (!N) return target.logDensity(z, grad);
    toTheta(z, thetaBuf);
    const l = target.logDensity(thetaBuf, gradBuf);
    grad.fill(0);
    for (let j = 0; j < d; j++) {
      const gj = gradBuf[j];
      if (gj === 0) continue;
      const r = j * n;
      for (let q = 0; q < n; q++) grad[q] += N[r + q] * gj;
    }
    return l;
  };
  return {
    target,
    n,
    A: reg.ineq.A,
    b: reg.ineq.b,
    m: reg.ineq.m,
    toTheta,
    logDensity,
    centre: reg.centre,
    rowLabels: reg.ineq.labels,
    bounded: reg.bounded,
    dikinL: reg.dikinL,
    dikinFirst: lowerProfile(reg.dikinL, n),
    rows: reg.rows,
    theta0,
    N,
  };
}

export function checkRegion(
  ineq: LinearSystem,
  eq: LinearSystem,
):
  | { ok: true; interiorPoint: Float64Array; dimension: number }
  | { ok: false; message: string; conflicting: string[] } {
  const d = ineq.rows > 0 ? ineq.cols : eq.cols;
  try {
    const reg = prepareRegion(ineq, eq, d);
    const theta = new Float64Array(d);
    const n = reg.red.n;
    for (let j = 0; j < d; j++) {
      let s = reg.red.theta0[j];
      if (reg.red.N) for (let q = 0; q < n; q++) s += reg.red.N[j * n + q] * reg.centre[q];
      else s = reg.centre[j];
      theta[j] = s;
    }
    return { ok: true, interiorPoint: theta, dimension: n };
  } catch (e) {
    if (e instanceof RegionError) return { ok: false, message: e.message, conflicting: e.conflicting };
    throw e;
  }
}

/**
 * True when ℓ is constant on the region: its gradient is exactly zero and its value unchanged at the
 * centre and at a few fixed interior points (a compiled log-density with no term depending on the
 * unknowns behaves this way). A false "not flat" only costs efficiency (slice sampling instead of the
 * exact chord); the probe points are inside the Dikin ellipsoid of radius ½, hence strictly interior.
 */
export function isFlat(p: PreparedTarget): boolean {
  if (p.flat !== undefined) return p.flat;
  const n = p.n;
  const grad = new Float64Array(n);
  const l0 = p.logDensity(p.centre, grad);
  assertFiniteStart(p, l0, p.centre);
  let flat = grad.every((v) => v === 0);
  const rng = new Rng(7919, 3);
  const u = new Float64Array(n);
  const z = new Float64Array(n);
  for (let k = 0; k < 4 && flat; k++) {
    rng.normals(u);
    const nu = Math.sqrt(dot(u, u));
    for (let q = 0; q < n; q++) u[q] /= 2 * nu;
    backwardL(p.dikinL, n, u, z, p.dikinFirst);
    for (let q = 0; q < n; q++) z[q] += p.centre[q];
    const l = p.logDensity(z, grad);
    if (!(l === l0) || !grad.every((v) => v === 0)) flat = false;
  }
  p.flat = flat;
  return flat;
}

/** out = L⁻ᵀ u for a row-major lower factor L (a direction of Dikin length |u|). */
export function backwardL(L: Float64Array, n: number, u: Float64Array, out: Float64Array, first?: Int32Array): Float64Array {
  if (out !== u) out.set(u);
  for (let i = n - 1; i >= 0; i--) {
    const xi = out[i] / L[i * n + i];
    out[i] = xi;
    // Entries left of the row's first non-zero are exact zeros: skipping them changes nothing.
    for (let k = first ? first[i] : 0; k < i; k++) out[k] -= L[i * n + k] * xi;
  }
  return out;
}

/** First non-zero column of each row of a lower-triangular row-major n × n matrix. */
export function lowerProfile(L: Float64Array, n: number): Int32Array {
  const first = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    let k = 0;
    while (k < i && L[i * n + k] === 0) k++;
    first[i] = k;
  }
  return first;
}

export function assertFiniteStart(p: PreparedTarget, l: number, z: Float64Array): void {
  if (Number.isFinite(l)) return;
  const theta = new Float64Array(p.target.dim);
  p.toTheta(z, theta);
  const shown = p.target.names
    .slice(0, 6)
    .map((nm, j) => `${nm} = ${theta[j].toPrecision(4)}`)
    .join(', ');
  throw new Error(
    `The log-density is ${Number.isNaN(l) ? 'not a number' : l} at the starting point inside the constraints (${shown}${p.target.dim > 6 ? ', …' : ''}). ` +
      'Check that every term is defined everywhere the constraints allow (for example a scale that may reach 0 needs a positive lower bound).',
  );
}

/** `count` strictly interior starts in z coordinates, spread by a short hit-and-run from the centre. */
export function dispersedStarts(p: PreparedTarget, count: number, rng: Rng): Float64Array[] {
  const flat = isFlat(p); // also checks ℓ is finite at the centre
  const steps = 10 + 2 * p.n;
  const out: Float64Array[] = [];
  for (let c = 0; c < count; c++) {
    const st = makeHitRunState(p, p.centre, flat && p.bounded);
    for (let k = 0; k < steps; k++) hitRunStep(p, st, rng, false);
    out.push(Float64Array.from(st.z));
  }
  return out;
}

export function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}
