/**
 * Small hand-built targets with known answers, for the sampler, geometry and fit tests and for the
 * benchmark. Each factory takes one argument so it can be named in a TargetSpec of kind 'module'.
 */
import type { LinearSystem, ModelTarget } from '../../../server/engine/types';

export function system(cols: number, rows: { a: Record<number, number>; b: number; label?: string }[]): LinearSystem {
  const A = new Float64Array(rows.length * cols);
  const b = new Float64Array(rows.length);
  const labels: string[] = [];
  rows.forEach((r, i) => {
    for (const [j, v] of Object.entries(r.a)) A[i * cols + Number(j)] = v;
    b[i] = r.b;
    labels.push(r.label ?? `row ${i + 1}`);
  });
  return { rows: rows.length, cols, A, b, labels };
}

export const emptySystem = (cols: number): LinearSystem => system(cols, []);

const names = (base: string, d: number) => Array.from({ length: d }, (_, i) => `${base}[${i + 1}]`);

const flat = (_t: Float64Array, g: Float64Array) => {
  g.fill(0);
  return 0;
};

/** Uniform on the standard d-simplex {x ∈ ℝ^d : x ≥ 0, Σ x ≤ 1}. */
export function uniformSimplexTarget(d: number): ModelTarget {
  const rows = [];
  for (let j = 0; j < d; j++) rows.push({ a: { [j]: -1 }, b: 0, label: `w[${j + 1}] >= 0` });
  const all: Record<number, number> = {};
  for (let j = 0; j < d; j++) all[j] = 1;
  rows.push({ a: all, b: 1, label: 'sum(w) <= 1' });
  return { dim: d, names: names('w', d), logDensity: flat, inequalities: system(d, rows), equalities: emptySystem(d) };
}

/** Uniform on {x ∈ ℝ^k : x ≥ 0, Σ x = 1} with the sum given as an equality (k components). */
export function equalitySimplexTarget(k: number): ModelTarget {
  const rows = [];
  for (let j = 0; j < k; j++) rows.push({ a: { [j]: -1 }, b: 0, label: `w[${j + 1}] >= 0` });
  const all: Record<number, number> = {};
  for (let j = 0; j < k; j++) all[j] = 1;
  return {
    dim: k,
    names: names('w', k),
    logDensity: flat,
    inequalities: system(k, rows),
    equalities: system(k, [{ a: all, b: 1, label: 'sum(w) == 1' }]),
  };
}

/** Uniform on the order simplex {0 ≤ x₁ ≤ … ≤ xₙ ≤ 1}. */
export function orderSimplexTarget(n: number): ModelTarget {
  const rows: { a: Record<number, number>; b: number; label: string }[] = [{ a: { 0: -1 }, b: 0, label: 'x[1] >= 0' }];
  for (let j = 0; j + 1 < n; j++) rows.push({ a: { [j]: 1, [j + 1]: -1 }, b: 0, label: `x[${j + 1}] <= x[${j + 2}]` });
  rows.push({ a: { [n - 1]: 1 }, b: 1, label: `x[${n}] <= 1` });
  return { dim: n, names: names('x', n), logDensity: flat, inequalities: system(n, rows), equalities: emptySystem(n) };
}

/** Standard normal truncated to [lo, hi] (either may be infinite). */
export function truncatedNormalTarget(args: { lo: number; hi: number }): ModelTarget {
  const rows = [];
  if (Number.isFinite(args.lo)) rows.push({ a: { 0: -1 }, b: -args.lo, label: `x >= ${args.lo}` });
  if (Number.isFinite(args.hi)) rows.push({ a: { 0: 1 }, b: args.hi, label: `x <= ${args.hi}` });
  return {
    dim: 1,
    names: ['x'],
    logDensity: (t, g) => {
      g[0] = -t[0];
      return -0.5 * t[0] * t[0];
    },
    inequalities: system(1, rows),
    equalities: emptySystem(1),
  };
}

/** Normal mean μ with known σ and a normal prior N(mu0, tau0²), no constraints. */
export function normalMeanTarget(args: { y: number[]; sigma: number; mu0: number; tau0: number }): ModelTarget {
  const { y, sigma, mu0, tau0 } = args;
  return {
    dim: 1,
    names: ['mu'],
    logDensity: (t, g) => {
      const mu = t[0];
      let l = -0.5 * ((mu - mu0) / tau0) ** 2;
      let d = -(mu - mu0) / (tau0 * tau0);
      for (const v of y) {
        l -= 0.5 * ((v - mu) / sigma) ** 2;
        d += (v - mu) / (sigma * sigma);
      }
      g[0] = d;
      return l;
    },
    inequalities: emptySystem(1),
    equalities: emptySystem(1),
  };
}

/** Binomial success probability with a Beta(α, β) prior: posterior Beta(α + y, β + N − y). */
export function betaBinomialTarget(args: { y: number; N: number; alpha: number; beta: number }): ModelTarget {
  const { y, N, alpha, beta } = args;
  const a1 = y + alpha - 1;
  const b1 = N - y + beta - 1;
  return {
    dim: 1,
    names: ['p'],
    logDensity: (t, g) => {
      const p = t[0];
      if (!(p > 0 && p < 1)) {
        g[0] = NaN;
        return -Infinity;
      }
      g[0] = a1 / p - b1 / (1 - p);
      return a1 * Math.log(p) + b1 * Math.log(1 - p);
    },
    inequalities: system(1, [
      { a: { 0: -1 }, b: 0, label: 'p >= 0' },
      { a: { 0: 1 }, b: 1, label: 'p <= 1' },
    ]),
    equalities: emptySystem(1),
  };
}

/** Gaussian noise with known σ around ordered means μ₁ ≤ … ≤ μₙ, flat prior. */
export function orderedMeansTarget(args: { y: number[]; sigma: number }): ModelTarget {
  const { y, sigma } = args;
  const n = y.length;
  const rows = [];
  for (let j = 0; j + 1 < n; j++) rows.push({ a: { [j]: 1, [j + 1]: -1 }, b: 0, label: `mu[${j + 1}] <= mu[${j + 2}]` });
  return {
    dim: n,
    names: names('mu', n),
    logDensity: (t, g) => {
      let l = 0;
      for (let j = 0; j < n; j++) {
        const r = y[j] - t[j];
        l -= (0.5 * r * r) / (sigma * sigma);
        g[j] = r / (sigma * sigma);
      }
      return l;
    },
    inequalities: system(n, rows),
    equalities: emptySystem(n),
  };
}

/** A Gaussian N(mean, diag(sd²)) restricted to the d-simplex: a non-flat bounded target for gradient tests. */
export function gaussianOnSimplexTarget(args: { d: number; centre: number; sd: number }): ModelTarget {
  const base = uniformSimplexTarget(args.d);
  return {
    ...base,
    logDensity: (t, g) => {
      let l = 0;
      for (let j = 0; j < args.d; j++) {
        const r = (t[j] - args.centre) / args.sd;
        l -= 0.5 * r * r;
        g[j] = -r / args.sd;
      }
      return l;
    },
  };
}

/** Bivariate normal with means (m1, m2), sds (s1, s2) and correlation r; no constraints. */
export function bivariateNormalTarget(args: { m1: number; m2: number; s1: number; s2: number; r: number }): ModelTarget {
  const { m1, m2, s1, s2, r } = args;
  const k = 1 / (1 - r * r);
  return {
    dim: 2,
    names: ['a', 'b'],
    logDensity: (t, g) => {
      const u = (t[0] - m1) / s1;
      const v = (t[1] - m2) / s2;
      g[0] = (-k * (u - r * v)) / s1;
      g[1] = (-k * (v - r * u)) / s2;
      return -0.5 * k * (u * u - 2 * r * u * v + v * v);
    },
    inequalities: emptySystem(2),
    equalities: emptySystem(2),
  };
}

/**
 * Group means under an ordering with a shared noise scale: y[g][i] ~ N(mu[g], sigma²),
 * mu ~ N(0, 10²), sigma ~ half-N(0, 5²); constraints mu₁ ≤ … ≤ mu_G and sigma ≥ 0.01.
 * θ = (mu[1..G], sigma). A realistic posterior without a closed form, for cross-checks.
 */
export function orderedGroupsTarget(args: { y: number[][] }): ModelTarget {
  const G = args.y.length;
  const dim = G + 1;
  const rows: { a: Record<number, number>; b: number; label: string }[] = [];
  for (let g = 0; g + 1 < G; g++) rows.push({ a: { [g]: 1, [g + 1]: -1 }, b: 0, label: `mu[${g + 1}] <= mu[${g + 2}]` });
  rows.push({ a: { [G]: -1 }, b: -0.01, label: 'sigma >= 0.01' });
  return {
    dim,
    names: [...names('mu', G), 'sigma'],
    logDensity: (t, grad) => {
      const sigma = t[G];
      if (!(sigma > 0)) {
        grad.fill(NaN);
        return -Infinity;
      }
      let l = 0;
      let gs = 0;
      for (let g = 0; g < G; g++) {
        let gm = -t[g] / 100;
        l -= (t[g] * t[g]) / 200;
        for (const v of args.y[g]) {
          const r = v - t[g];
          l -= (r * r) / (2 * sigma * sigma) + Math.log(sigma);
          gm += r / (sigma * sigma);
          gs += (r * r) / (sigma * sigma * sigma) - 1 / sigma;
        }
        grad[g] = gm;
      }
      l -= (sigma * sigma) / 50;
      gs -= sigma / 25;
      grad[G] = gs;
      return l;
    },
    inequalities: system(dim, rows),
    equalities: emptySystem(dim),
  };
}

/** Independent standard normals, coordinate j truncated to [lo[j], hi[j]] (bounds only: a box). */
export function truncatedNormalBoxTarget(args: { lo: number[]; hi: number[] }): ModelTarget {
  const d = args.lo.length;
  const rows = [];
  for (let j = 0; j < d; j++) {
    rows.push({ a: { [j]: -1 }, b: -args.lo[j], label: `x[${j + 1}] >= ${args.lo[j]}` });
    rows.push({ a: { [j]: 1 }, b: args.hi[j], label: `x[${j + 1}] <= ${args.hi[j]}` });
  }
  return {
    dim: d,
    names: names('x', d),
    logDensity: (t, g) => {
      let l = 0;
      for (let j = 0; j < d; j++) {
        g[j] = -t[j];
        l -= 0.5 * t[j] * t[j];
      }
      return l;
    },
    inequalities: system(d, rows),
    equalities: emptySystem(d),
  };
}

/**
 * Uniform on {x ≥ 0, Σ_{j < k} x_j ≤ 1, Σ_{j ≥ k} x_j ≤ 1}: two budget rows over disjoint groups,
 * i.e. the product of a k-simplex and a (d − k)-simplex.
 */
export function twoBudgetsTarget(args: { d: number; k: number }): ModelTarget {
  const { d, k } = args;
  const rows = [];
  for (let j = 0; j < d; j++) rows.push({ a: { [j]: -1 }, b: 0, label: `x[${j + 1}] >= 0` });
  const g1: Record<number, number> = {};
  const g2: Record<number, number> = {};
  for (let j = 0; j < d; j++) (j < k ? g1 : g2)[j] = 1;
  rows.push({ a: g1, b: 1, label: 'first budget' });
  rows.push({ a: g2, b: 1, label: 'second budget' });
  return { dim: d, names: names('x', d), logDensity: flat, inequalities: system(d, rows), equalities: emptySystem(d) };
}
