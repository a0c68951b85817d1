/**
 * Our own evaluator for expressions that do not depend on the unknowns (constants and data).
 * It walks the checked tree; it never evaluates source text.
 */
import type { Expr } from './ast';
import { LangError } from './parse';

/** Data values as the front end sees them (structurally the engine's DataTables). */
export interface DataValuesColumn {
  type: 'numeric' | 'integer' | 'category';
  values: Float64Array;
  levels?: string[];
}
export type DataValues = Record<string, { rows: number; columns: Record<string, DataValuesColumn> }>;

export interface Mat {
  rows: number;
  cols: number;
  /** row-major */
  data: Float64Array;
}
export type Value = number | Float64Array | Mat;

export function isMat(v: Value): v is Mat {
  return typeof v === 'object' && !(v instanceof Float64Array);
}

/** Lanczos approximation (g = 7, n = 9), common practice; accurate to ~1e-15 for x > 0. */
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];
export function lgammaApprox(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - lgammaApprox(1 - x);
  x -= 1;
  let a = LANCZOS[0];
  const t = x + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i] / (x + i);
  return 0.5 * Math.log(2 * Math.PI) + (x + 0.5) * Math.log(t) - t + Math.log(a);
}

export type ScalarFn = (x: number) => number;

const softplus = (x: number) => (x > 0 ? x + Math.log1p(Math.exp(-x)) : Math.log1p(Math.exp(x)));
export const DEFAULT_MATH: Record<string, ScalarFn> = Object.assign(Object.create(null) as Record<string, ScalarFn>, {
  exp: Math.exp,
  log: Math.log,
  log1p: Math.log1p,
  expm1: Math.expm1,
  sqrt: Math.sqrt,
  square: (x: number) => x * x,
  abs: Math.abs,
  logistic: (x: number) => 1 / (1 + Math.exp(-x)),
  log_logistic: (x: number) => -softplus(-x),
  softplus,
  lgamma: lgammaApprox,
});

function map1(v: Value, f: ScalarFn): Value {
  if (typeof v === 'number') return f(v);
  if (v instanceof Float64Array) return v.map(f);
  return { rows: v.rows, cols: v.cols, data: v.data.map(f) };
}

function map2(a: Value, b: Value, f: (x: number, y: number) => number): Value {
  if (typeof a === 'number' && typeof b === 'number') return f(a, b);
  if (isMat(a) || isMat(b)) throw new Error('matrix in elementwise operation');
  const n = typeof a === 'number' ? (b as Float64Array).length : a.length;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = f(typeof a === 'number' ? a : a[i], typeof b === 'number' ? b : b[i]);
  return out;
}

function vec(v: Value): Float64Array {
  if (typeof v === 'number') return Float64Array.of(v);
  if (v instanceof Float64Array) return v;
  throw new Error('matrix where a vector was expected');
}

/**
 * Evaluate a checked expression whose dep < 2. `data` may be undefined when the expression only
 * uses constants. `math` lets the engine supply its own special functions.
 */
/** Supplies log-density values for constant arguments (the engine passes its density library). */
export type DensityHook = (fn: string, args: Value[]) => number | undefined;

export function evaluateValue(
  e: Expr,
  data: DataValues | undefined,
  math: Record<string, ScalarFn> = DEFAULT_MATH,
  densities?: DensityHook,
): Value {
  const ev = (x: Expr) => evaluateValue(x, data, math, densities);
  switch (e.kind) {
    case 'num':
      return e.value;
    case 'name':
    case 'member': {
      const ref = e.ref;
      if (!ref) throw new LangError(e.span, 'unresolved name');
      if (ref.kind === 'const') return ref.value;
      if (ref.kind === 'let') return ev(ref.expr);
      if (ref.kind === 'column') {
        const t = data && Object.prototype.hasOwnProperty.call(data, ref.table) ? data[ref.table] : undefined;
        const col = t && Object.prototype.hasOwnProperty.call(t.columns, ref.column) ? t.columns[ref.column] : undefined;
        if (!col) throw new LangError(e.span, `the data for column \`${ref.column}\` of table \`${ref.table}\` is missing`);
        return col.values;
      }
      throw new LangError(e.span, 'this value depends on the unknowns');
    }
    case 'index': {
      const base = vec(ev(e.base));
      const idx = ev(e.index);
      const pick = (k: number) => {
        if (!Number.isInteger(k) || k < 1 || k > base.length)
          throw new LangError(e.index.span, `index ${k} is outside 1…${base.length}`);
        return base[k - 1];
      };
      if (typeof idx === 'number') return pick(idx);
      return vec(idx).map(pick);
    }
    case 'unary':
      return map1(ev(e.arg), (x) => -x);
    case 'binary': {
      const a = ev(e.left);
      const b = ev(e.right);
      if (e.op === '*' && isMat(a)) {
        const v = vec(b);
        const out = new Float64Array(a.rows);
        for (let i = 0; i < a.rows; i++) {
          let s = 0;
          for (let j = 0; j < a.cols; j++) s += a.data[i * a.cols + j] * v[j];
          out[i] = s;
        }
        return out;
      }
      const f =
        e.op === '+'
          ? (x: number, y: number) => x + y
          : e.op === '-'
            ? (x: number, y: number) => x - y
            : e.op === '*'
              ? (x: number, y: number) => x * y
              : e.op === '/'
                ? (x: number, y: number) => x / y
                : Math.pow;
      return map2(a, b, f);
    }
    case 'array': {
      const items = e.items.map(ev);
      if (items.every((v) => typeof v === 'number')) return Float64Array.from(items as number[]);
      const cols = items.map(vec);
      const rows = cols[0].length;
      const data = new Float64Array(rows * cols.length);
      for (let i = 0; i < rows; i++) for (let j = 0; j < cols.length; j++) data[i * cols.length + j] = cols[j][i];
      return { rows, cols: cols.length, data };
    }
    case 'call': {
      const args = e.args.map(ev);
      const fn = e.fn;
      if (fn === 'pow') return map2(args[0], args[1], Math.pow);
      const f = Object.prototype.hasOwnProperty.call(math, fn) ? math[fn] : undefined;
      if (f) return map1(args[0], f);
      if (fn === 'sum' || fn === 'mean') {
        const v = vec(args[0]);
        let s = 0;
        for (let i = 0; i < v.length; i++) s += v[i];
        return fn === 'sum' ? s : s / v.length;
      }
      if (fn === 'log_sum_exp') {
        const v = vec(args[0]);
        let m = -Infinity;
        for (let i = 0; i < v.length; i++) if (v[i] > m) m = v[i];
        if (m === -Infinity || m === Infinity) return m;
        let s = 0;
        for (let i = 0; i < v.length; i++) s += Math.exp(v[i] - m);
        return m + Math.log(s);
      }
      if (fn === 'dot') {
        const a = vec(args[0]);
        const b = vec(args[1]);
        let s = 0;
        for (let i = 0; i < a.length; i++) s += a[i] * b[i];
        return s;
      }
      if (fn === 'cumsum') {
        const v = vec(args[0]);
        const out = new Float64Array(v.length);
        let s = 0;
        for (let i = 0; i < v.length; i++) out[i] = s += v[i];
        return out;
      }
      if (fn === 'diff') {
        const v = vec(args[0]);
        const out = new Float64Array(v.length - 1);
        for (let i = 0; i + 1 < v.length; i++) out[i] = v[i + 1] - v[i];
        return out;
      }
      const d = densities?.(fn, args);
      if (d !== undefined) return d;
      throw new LangError(e.fnSpan, `\`${fn}\` cannot be evaluated here`);
    }
    case 'compare':
      throw new LangError(e.span, 'a comparison has no value');
  }
}
