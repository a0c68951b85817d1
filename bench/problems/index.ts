/**
 * The sampler benchmark's problems P1–P9, written in the model language: each generator returns
 * the model text and its data tables, deterministic in the seed (the engine's own generator,
 * server/engine/rng.ts). Every engine fits the same compiled model.
 *
 *   npx tsx bench/problems/index.ts --write DIR [--seed N]   writes DIR/P1.slk, DIR/P1_<table>.csv, …
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { Rng } from '../../server/engine/rng';
import type { DataColumn, DataTable, DataTables } from '../../server/engine/types';

export interface Problem {
  id: string;
  title: string;
  source: string;
  tables: DataTables;
}

export const DEFAULT_PROBLEM_SEED = 20261203;

/* ----------------------------------------------------------------------------------------------- */
/* Helpers                                                                                         */
/* ----------------------------------------------------------------------------------------------- */

const num = (values: ArrayLike<number>): DataColumn => ({ type: 'numeric', values: Float64Array.from(values) });
const int = (values: ArrayLike<number>): DataColumn => ({ type: 'integer', values: Float64Array.from(values) });
const table = (rows: number, columns: Record<string, DataColumn>): DataTable => ({ rows, columns });
const names = (base: string, k: number) => Array.from({ length: k }, (_, i) => `${base}${i + 1}`);
/** Rounds to 12 significant digits so the tables survive a CSV round trip unchanged. */
const r12 = (x: number) => Number(x.toPrecision(12));

/** A random orthogonal n × n matrix (Gram–Schmidt on Gaussian columns), row-major. */
function randomOrthogonal(n: number, rng: Rng): Float64Array {
  const Q = new Float64Array(n * n);
  const v = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    rng.normals(v);
    for (let k = 0; k < 2; k++)
      for (let p = 0; p < c; p++) {
        let d = 0;
        for (let i = 0; i < n; i++) d += Q[i * n + p] * v[i];
        for (let i = 0; i < n; i++) v[i] -= d * Q[i * n + p];
      }
    let s = 0;
    for (let i = 0; i < n; i++) s += v[i] * v[i];
    s = Math.sqrt(s);
    for (let i = 0; i < n; i++) Q[i * n + c] = v[i] / s;
  }
  return Q;
}

/**
 * A Gaussian with condition number `cond`: covariance Σ = Q diag(λ) Qᵀ, λ log-spaced from
 * `smallest` to smallest·cond. Returns R = diag(λ^{-1/2}) Qᵀ (so the precision is RᵀR) and Σ.
 */
function gaussian(n: number, cond: number, smallest: number, rng: Rng): { R: Float64Array; Sigma: Float64Array } {
  const Q = randomOrthogonal(n, rng);
  const lam = Array.from({ length: n }, (_, i) => smallest * Math.pow(cond, n === 1 ? 0 : i / (n - 1)));
  const R = new Float64Array(n * n);
  const Sigma = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) R[i * n + j] = Q[j * n + i] / Math.sqrt(lam[i]);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += Q[i * n + k] * lam[k] * Q[j * n + k];
      Sigma[i * n + j] = s;
    }
  return { R, Sigma };
}

/** Matrix rows as columns of a table: column `${base}${j+1}` holds M[·, j]. */
function matrixColumns(M: Float64Array, rows: number, cols: number, base: string): Record<string, DataColumn> {
  const out: Record<string, DataColumn> = {};
  for (let j = 0; j < cols; j++) out[`${base}${j + 1}`] = num(Array.from({ length: rows }, (_, i) => r12(M[i * cols + j])));
  return out;
}

/** Unit random directions (rows) and right-hand sides b = a·centre + scale·√(aᵀΣa)·U(lo, hi). */
function randomPolytope(
  n: number,
  m: number,
  rng: Rng,
  rhs: (a: Float64Array) => number,
): { A: Float64Array; b: Float64Array } {
  const A = new Float64Array(m * n);
  const b = new Float64Array(m);
  const a = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    rng.normals(a);
    let s = 0;
    for (let q = 0; q < n; q++) s += a[q] * a[q];
    s = Math.sqrt(s);
    for (let q = 0; q < n; q++) a[q] = r12(a[q] / s);
    A.set(a, i * n);
    b[i] = r12(rhs(a));
  }
  return { A, b };
}

const quad = (a: Float64Array, S: Float64Array, n: number) => {
  let s = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) s += a[i] * S[i * n + j] * a[j];
  return s;
};

/* ----------------------------------------------------------------------------------------------- */
/* P1–P9                                                                                          */
/* ----------------------------------------------------------------------------------------------- */

/** P1: uniform on the order simplex 0 ≤ x₁ ≤ … ≤ x₅₀ ≤ 1. */
export function p1OrderSimplex(): Problem {
  return {
    id: 'P1',
    title: 'uniform order simplex, d = 50',
    source: ['# P1: uniform on the order simplex', 'unknown x[50]', 'constrain 0 <= x[1]', 'constrain diff(x) >= 0', 'constrain x[50] <= 1', ''].join('\n'),
    tables: {},
  };
}

/** P2: uniform on a randomly rotated box, half-widths 1 and one of 1000. */
export function p2RotatedBox(seed = DEFAULT_PROBLEM_SEED): Problem {
  const n = 50;
  const rng = new Rng(seed, 2);
  const Q = randomOrthogonal(n, rng);
  // Rows of Qᵀ: u = Qᵀx, |u_i| ≤ h_i.
  const G = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) G[i * n + j] = Q[j * n + i];
  const h = Array.from({ length: n }, (_, i) => (i === 0 ? 1000 : 1));
  const cols = names('g', n);
  return {
    id: 'P2',
    title: 'uniform on a randomly rotated box, d = 50, one side 1000× longer',
    source: [
      '# P2: uniform on a rotated box |G x| <= half (elementwise)',
      'table box',
      'unknown x[50]',
      `let G = [${cols.join(', ')}]`,
      'constrain G * x <= half',
      'constrain G * x >= -half',
      '',
    ].join('\n'),
    tables: { box: table(n, { ...matrixColumns(G, n, n, 'g'), half: num(h) }) },
  };
}

/** P3: multinomial posterior on the 50-part simplex, flat prior, counts with zeros. */
export function p3Multinomial(seed = DEFAULT_PROBLEM_SEED): Problem {
  const k = 50;
  const rng = new Rng(seed, 3);
  // Skewed true shares (a geometric-like profile), 300 draws: many small categories get zero.
  const w = Array.from({ length: k }, (_, i) => Math.exp(-i / 8));
  const tot = w.reduce((a, v) => a + v, 0);
  const counts = new Array(k).fill(0);
  for (let r = 0; r < 300; r++) {
    let u = rng.uniform() * tot;
    let c = 0;
    while (c < k - 1 && u > w[c]) u -= w[c++];
    counts[c]++;
  }
  return {
    id: 'P3',
    title: 'multinomial posterior on the 50-part simplex (flat prior, counts with zeros)',
    source: ['# P3: multinomial shares with a flat prior', 'table tally', 'unknown share[50]', 'term ld_multinomial(count, share)', 'constrain share >= 0', 'constrain sum(share) == 1', ''].join('\n'),
    tables: { tally: table(k, { count: int(counts) }) },
  };
}

/** P4: isotonic regression posterior: 40 ordered group means, 5,000 rows, known noise sd 1. */
export function p4Isotonic(seed = DEFAULT_PROBLEM_SEED): Problem {
  const G = 40;
  const rows = 5000;
  const rng = new Rng(seed, 4);
  // True means rise in steps with plateaus, so many orderings bind.
  const mu = Array.from({ length: G }, (_, g) => 0.5 * Math.floor(g / 5));
  const group: number[] = [];
  const y: number[] = [];
  for (let r = 0; r < rows; r++) {
    const g = 1 + rng.int(G);
    group.push(g);
    y.push(r12(mu[g - 1] + rng.normal()));
  }
  return {
    id: 'P4',
    title: 'isotonic regression posterior, 40 ordered means, 5,000 rows',
    source: ['# P4: ordered group means, known noise', 'table obs', 'unknown mu[40]', 'term ld_normal(y, mu[group], 1)', 'constrain diff(mu) >= 0', ''].join('\n'),
    tables: { obs: table(rows, { group: int(group), y: num(y) }) },
  };
}

/** P5: non-negative regression, 20 correlated predictors (AR(1) correlation 0.8), 2,000 rows. */
export function p5NonNegative(seed = DEFAULT_PROBLEM_SEED): Problem {
  const k = 20;
  const rows = 2000;
  const rng = new Rng(seed, 5);
  const beta = Array.from({ length: k }, (_, j) => (j % 2 === 0 ? 0 : 0.3 + 0.05 * j));
  const X = new Float64Array(rows * k);
  const y: number[] = [];
  for (let r = 0; r < rows; r++) {
    let prev = rng.normal();
    let eta = 0;
    for (let j = 0; j < k; j++) {
      const v = j === 0 ? prev : 0.8 * prev + 0.6 * rng.normal();
      prev = v;
      X[r * k + j] = r12(v);
      eta += beta[j] * X[r * k + j];
    }
    y.push(r12(eta + 2 * rng.normal()));
  }
  const cols = names('x', k);
  return {
    id: 'P5',
    title: 'non-negative regression, 20 correlated predictors, 2,000 rows',
    source: [
      '# P5: regression with non-negative coefficients',
      'table reg',
      'unknown beta[20], sigma',
      `let X = [${cols.join(', ')}]`,
      'term ld_normal(y, X * beta, sigma)',
      'term ld_halfnormal(sigma, 5)',
      'constrain beta >= 0',
      'constrain sigma >= 0.01',
      '',
    ].join('\n'),
    tables: { reg: table(rows, { ...matrixColumns(X, rows, k, 'x'), y: num(y) }) },
  };
}

/** Gaussian log-density as model text: −½ |R x − c|² with R, c in table `prec`. */
function gaussianLines(n: number): string[] {
  return [`let R = [${names('r', n).join(', ')}]`, 'term -0.5 * sum(square(R * x - c))'];
}

/** P6: Gaussian (condition number 100) truncated to a random polytope, d = 50, 150 constraints. */
export function p6TruncatedGaussian(seed = DEFAULT_PROBLEM_SEED): Problem {
  const n = 50;
  const m = 150;
  const rng = new Rng(seed, 6);
  const { R, Sigma } = gaussian(n, 100, 0.01, rng);
  // Centre 0 (c = 0); each face at 0.5–2 standard deviations along its normal, so every face cuts.
  const { A, b } = randomPolytope(n, m, rng, (a) => Math.sqrt(quad(a, Sigma, n)) * (0.5 + 1.5 * rng.uniform()));
  return {
    id: 'P6',
    title: 'Gaussian (condition number 100) truncated to a random polytope, d = 50, 150 constraints',
    source: ['# P6: truncated Gaussian', 'table prec', 'table poly', 'unknown x[50]', ...gaussianLines(n), `let A = [${names('a', n).join(', ')}]`, 'constrain A * x <= bound', ''].join('\n'),
    tables: {
      prec: table(n, { ...matrixColumns(R, n, n, 'r'), c: num(new Float64Array(n)) }),
      poly: table(m, { ...matrixColumns(A, m, n, 'a'), bound: num(b) }),
    },
  };
}

/** P7: uniform on the hypercube [0, 1]¹⁰⁰. */
export function p7Hypercube(): Problem {
  return {
    id: 'P7',
    title: 'uniform hypercube, d = 100',
    source: ['# P7: uniform on the unit hypercube', 'unknown x[100]', 'constrain 0 <= x <= 1', ''].join('\n'),
    tables: {},
  };
}

/**
 * P8: logistic regression, 30 coefficients and an intercept, 5,000 rows; β₁ ≥ 0 and
 * β₁ ≤ … ≤ β₁₀ (monotone dose effects), β₁₁…β₂₀ ≥ 0 (signs), β₂₁…β₃₀ free.
 */
export function p8Logistic(seed = DEFAULT_PROBLEM_SEED): Problem {
  const k = 30;
  const rows = 5000;
  const rng = new Rng(seed, 8);
  const beta = Array.from({ length: k }, (_, j) => (j < 10 ? 0.05 * Math.floor(j / 3) : j < 20 ? (j % 3 === 0 ? 0 : 0.2) : 0.3 * Math.sin(j)));
  const X = new Float64Array(rows * k);
  const y: number[] = [];
  for (let r = 0; r < rows; r++) {
    let eta = -0.5;
    for (let j = 0; j < k; j++) {
      const v = r12(rng.normal());
      X[r * k + j] = v;
      eta += beta[j] * v;
    }
    y.push(rng.uniform() < 1 / (1 + Math.exp(-eta)) ? 1 : 0);
  }
  return {
    id: 'P8',
    title: 'logistic regression, 30 coefficients under sign and monotonicity constraints, 5,000 rows',
    source: [
      '# P8: constrained logistic regression',
      'table trial',
      'unknown beta[30], alpha',
      `let X = [${names('x', k).join(', ')}]`,
      'term ld_bernoulli(y, logistic(X * beta + alpha))',
      'term ld_normal(beta, 0, 2.5) + ld_normal(alpha, 0, 5)',
      'constrain beta[1] >= 0',
      'constrain beta[1] <= beta[2] <= beta[3] <= beta[4] <= beta[5] <= beta[6] <= beta[7] <= beta[8] <= beta[9] <= beta[10]',
      `constrain ${Array.from({ length: 10 }, (_, j) => `beta[${11 + j}] >= 0`).join('\nconstrain ')}`,
      '',
    ].join('\n'),
    tables: { trial: table(rows, { ...matrixColumns(X, rows, k, 'x'), y: int(y) }) },
  };
}

/**
 * P9: Gaussian (condition number 100) centred outside a random polytope (200 faces at distance
 * 0.5–1.5 from the origin), d = 50: the mass presses against many faces.
 */
export function p9GaussianOutside(seed = DEFAULT_PROBLEM_SEED): Problem {
  const n = 50;
  const m = 200;
  const rng = new Rng(seed, 9);
  const { R } = gaussian(n, 100, 0.01, rng);
  const { A, b } = randomPolytope(n, m, rng, () => 0.5 + rng.uniform());
  // Centre at distance 2 along a random direction: c = R μ.
  const mu = new Float64Array(n);
  rng.normals(mu);
  const s = Math.sqrt(mu.reduce((a, v) => a + v * v, 0));
  for (let q = 0; q < n; q++) mu[q] = (2 * mu[q]) / s;
  const c = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) c[i] += R[i * n + j] * mu[j];
  return {
    id: 'P9',
    title: 'Gaussian (condition number 100) centred outside a random polytope, d = 50, 200 constraints',
    source: ['# P9: Gaussian centred outside the polytope', 'table prec', 'table poly', 'unknown x[50]', ...gaussianLines(n), `let A = [${names('a', n).join(', ')}]`, 'constrain A * x <= bound', ''].join('\n'),
    tables: {
      prec: table(n, { ...matrixColumns(R, n, n, 'r'), c: num(Array.from(c, r12)) }),
      poly: table(m, { ...matrixColumns(A, m, n, 'a'), bound: num(b) }),
    },
  };
}

export const PROBLEMS: Record<string, (seed?: number) => Problem> = {
  P1: () => p1OrderSimplex(),
  P2: p2RotatedBox,
  P3: p3Multinomial,
  P4: p4Isotonic,
  P5: p5NonNegative,
  P6: p6TruncatedGaussian,
  P7: () => p7Hypercube(),
  P8: p8Logistic,
  P9: p9GaussianOutside,
};

/** CSV text of a table (header, then rows; shortest round-trip numbers). */
export function tableCsv(t: DataTable): string {
  const cols = Object.keys(t.columns);
  const lines = [cols.join(',')];
  for (let r = 0; r < t.rows; r++) lines.push(cols.map((c) => String(t.columns[c].values[r])).join(','));
  return lines.join('\n') + '\n';
}

export function writeProblemFiles(dir: string, seed = DEFAULT_PROBLEM_SEED): string[] {
  mkdirSync(dir, { recursive: true });
  const written: string[] = [];
  for (const make of Object.values(PROBLEMS)) {
    const pr = make(seed);
    const f = path.join(dir, `${pr.id}.slk`);
    writeFileSync(f, pr.source);
    written.push(f);
    for (const [name, t] of Object.entries(pr.tables)) {
      const g = path.join(dir, `${pr.id}_${name}.csv`);
      writeFileSync(g, tableCsv(t));
      written.push(g);
    }
  }
  return written;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const i = process.argv.indexOf('--write');
  if (i < 0 || !process.argv[i + 1]) {
    console.error('usage: npx tsx bench/problems/index.ts --write DIR [--seed N]');
    process.exit(2);
  }
  const s = process.argv.indexOf('--seed');
  for (const f of writeProblemFiles(process.argv[i + 1], s >= 0 ? Number(process.argv[s + 1]) : DEFAULT_PROBLEM_SEED)) console.log(f);
}
