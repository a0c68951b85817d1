/**
 * The frozen runtime object handed to generated code: the density library's functions under their
 * exported names, nothing else. Generated code reaches it only as `R.<name>` where <name> comes
 * from the density tables (never from user text) and is validated as a plain identifier.
 */
import { DENSITY_TABLE, FUSED_DENSITY_TABLE, MATH_TABLE, logSumExp, logSumExpGrad, type DensityInfo } from '../densities/index';

export type RuntimeFn = (...args: never[]) => number;

const IDENT = /^[A-Za-z][A-Za-z0-9]*$/;

function build(): Readonly<Record<string, RuntimeFn>> {
  const r = Object.create(null) as Record<string, RuntimeFn>;
  const put = (name: string, f: unknown) => {
    if (!IDENT.test(name) || typeof f !== 'function') throw new Error(`bad runtime entry ${name}`);
    r[name] = f as RuntimeFn;
  };
  for (const d of [...Object.values(DENSITY_TABLE), ...Object.values(FUSED_DENSITY_TABLE)]) {
    put(d.valueFn, d.value);
    put(d.gradFn, d.grad);
  }
  for (const key of Object.keys(MATH_TABLE)) {
    const m = MATH_TABLE[key];
    put(`${m.valueFn}Value`, m.value);
    put(m.gradFn, m.grad);
  }
  put('logSumExp', logSumExp);
  put('logSumExpGrad', logSumExpGrad);
  return Object.freeze(r);
}

export const RUNTIME: Readonly<Record<string, RuntimeFn>> = build();

/** Runtime member name for a density's value or value-with-partials function. */
export function densityFn(lang: string, grad: boolean): string {
  const d = densityInfo(lang);
  if (!d) throw new Error(`no density ${lang}`);
  return grad ? d.gradFn : d.valueFn;
}

/** A language density, or a fused kernel under its internal name (see compile/fuse.ts). */
export function densityInfo(lang: string): DensityInfo | undefined {
  if (Object.prototype.hasOwnProperty.call(DENSITY_TABLE, lang)) return DENSITY_TABLE[lang];
  if (Object.prototype.hasOwnProperty.call(FUSED_DENSITY_TABLE, lang)) return FUSED_DENSITY_TABLE[lang];
  return undefined;
}

/** Runtime member names for a math function: value and value-with-derivative. */
export function mathFn(lang: string, grad: boolean): string {
  const m = Object.prototype.hasOwnProperty.call(MATH_TABLE, lang) ? MATH_TABLE[lang] : undefined;
  if (!m) throw new Error(`no math function ${lang}`);
  return grad ? m.gradFn : `${m.valueFn}Value`;
}

/**
 * Log-densities of constant arguments for the front end's constant evaluator: scalar densities
 * broadcast and summed, vector densities on whole vectors.
 */
export function constantDensity(fn: string, args: (number | Float64Array | { rows: number })[]): number | undefined {
  const d = densityInfo(fn);
  if (!d) return undefined;
  const vecs = args.map((a) => (typeof a === 'number' ? a : a instanceof Float64Array ? a : undefined));
  if (vecs.some((v) => v === undefined)) return undefined;
  if (d.kind === 'vector') {
    const x = vecs[0];
    const K = x instanceof Float64Array ? x.length : 1;
    const toVec = (v: number | Float64Array | undefined) => (v instanceof Float64Array ? v : new Float64Array(K).fill(v as number));
    return d.value(toVec(x), 0, toVec(vecs[1]), 0, K);
  }
  let L = 0;
  for (const v of vecs) if (v instanceof Float64Array) L = v.length;
  if (L === 0) return d.value(...(vecs as number[]));
  let s = 0;
  const row: number[] = new Array(vecs.length);
  for (let i = 0; i < L; i++) {
    for (let k = 0; k < vecs.length; k++) {
      const v = vecs[k]!;
      row[k] = typeof v === 'number' ? v : v[i];
    }
    s += d.value(...row);
  }
  return s;
}

/** The engine's special functions for the front end's constant evaluator. */
export function engineMath(): Record<string, (x: number) => number> {
  const out = Object.create(null) as Record<string, (x: number) => number>;
  for (const key of Object.keys(MATH_TABLE)) {
    const m = MATH_TABLE[key];
    if (m.arity === 1) out[key] = m.value as (x: number) => number;
  }
  return out;
}
