import { compileProgram, type CompiledModel } from '../../../server/engine/compile/index';
import type { DataTables } from '../../../server/engine/types';

export function numeric(values: number[]) {
  return { type: 'numeric' as const, values: Float64Array.from(values) };
}
export function integer(values: number[]) {
  return { type: 'integer' as const, values: Float64Array.from(values) };
}
export function category(values: number[], levels: string[]) {
  return { type: 'category' as const, values: Float64Array.from(values), levels };
}
export function table(columns: DataTables[string]['columns']): DataTables[string] {
  const first = Object.values(columns)[0];
  return { rows: first ? first.values.length : 0, columns };
}

export function compile(src: string, tables: DataTables = {}): CompiledModel {
  return compileProgram(src, tables);
}

/** Value only (gradient buffer discarded). */
export function value(m: CompiledModel, theta: number[] | Float64Array): number {
  return m.logDensity(Float64Array.from(theta), new Float64Array(m.dim));
}

/**
 * Central finite differences with one Richardson step (common practice):
 * D(h) = (f(x+h) − f(x−h)) / 2h, estimate (4·D(h/2) − D(h)) / 3, error O(h⁴).
 */
export function finiteDiffGrad(m: CompiledModel, theta: Float64Array): Float64Array {
  const g = new Float64Array(m.dim);
  for (let k = 0; k < m.dim; k++) {
    const h = 1e-3 * Math.max(1, Math.abs(theta[k]));
    const D = (hh: number) => {
      const a = theta.slice();
      const b = theta.slice();
      a[k] += hh;
      b[k] -= hh;
      return (value(m, a) - value(m, b)) / (2 * hh);
    };
    g[k] = (4 * D(h / 2) - D(h)) / 3;
  }
  return g;
}

/** Largest relative gradient error max_k |g − fd| / max(1, |fd|). */
export function gradError(m: CompiledModel, theta: number[] | Float64Array): { err: number; g: Float64Array; fd: Float64Array; v: number } {
  const t = Float64Array.from(theta);
  const g = new Float64Array(m.dim);
  const v = m.logDensity(t, g);
  const fd = finiteDiffGrad(m, t);
  let err = 0;
  for (let k = 0; k < m.dim; k++) err = Math.max(err, Math.abs(g[k] - fd[k]) / Math.max(1, Math.abs(fd[k])));
  return { err, g, fd, v };
}
