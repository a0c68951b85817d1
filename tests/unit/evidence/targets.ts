/** Polytopes and simple densities for the evidence tests and the benchmark. */
import type { LinearSystem, ModelTarget } from '../../../server/engine/types';

export function system(cols: number, rows: { a: number[]; b: number }[]): LinearSystem {
  const A = new Float64Array(rows.length * cols);
  rows.forEach((r, i) => r.a.forEach((v, j) => (A[i * cols + j] = v)));
  return { rows: rows.length, cols, A, b: Float64Array.from(rows.map((r) => r.b)), labels: rows.map((_, i) => `row ${i + 1}`) };
}

const flat = (_t: Float64Array, g: Float64Array) => {
  g.fill(0);
  return 0;
};

function names(d: number): string[] {
  return Array.from({ length: d }, (_, i) => `x[${i + 1}]`);
}

function unit(d: number, j: number, v: number): number[] {
  const a = new Array<number>(d).fill(0);
  a[j] = v;
  return a;
}

/** The box Π [0, sides[j]]. */
export function box(sides: number[]): ModelTarget {
  const d = sides.length;
  const rows = [];
  for (let j = 0; j < d; j++) {
    rows.push({ a: unit(d, j, -1), b: 0 });
    rows.push({ a: unit(d, j, 1), b: sides[j] });
  }
  return { dim: d, names: names(d), logDensity: flat, inequalities: system(d, rows), equalities: system(d, []) };
}

/** The standard simplex {x ≥ 0, Σx ≤ 1}. */
export function simplex(d: number): ModelTarget {
  const rows = [];
  for (let j = 0; j < d; j++) rows.push({ a: unit(d, j, -1), b: 0 });
  rows.push({ a: new Array<number>(d).fill(1), b: 1 });
  return { dim: d, names: names(d), logDensity: flat, inequalities: system(d, rows), equalities: system(d, []) };
}

/** The cross-polytope {Σ|xⱼ| ≤ 1}: 2^d rows ±x₁ ± … ± x_d ≤ 1. */
export function crossPolytope(d: number): ModelTarget {
  const rows = [];
  for (let mask = 0; mask < 1 << d; mask++) {
    rows.push({ a: Array.from({ length: d }, (_, j) => ((mask >> j) & 1 ? -1 : 1)), b: 1 });
  }
  return { dim: d, names: names(d), logDensity: flat, inequalities: system(d, rows), equalities: system(d, []) };
}
