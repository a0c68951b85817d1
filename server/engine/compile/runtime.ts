/**
 * The frozen runtime object handed to generated code: the density library's functions under their
 * exported names, nothing else. Generated code reaches it only as `R.<name>` where <name> comes
 * from the density tables (never from user text) and is validated as a plain identifier.
 */
import { DENSITY_TABLE, MATH_TABLE, logSumExp, logSumExpGrad } from '../densities/index';

export type RuntimeFn = (...args: never[]) => number;

const IDENT = /^[A-Za-z][A-Za-z0-9]*$/;

function build(): Readonly<Record<string, RuntimeFn>> {
  const r = Object.create(null) as Record<string, RuntimeFn>;
  const put = (name: string, f: unknown) => {
    if (!IDENT.test(name) || typeof f !== 'function') throw new Error(`bad runtime entry ${name}`);
    r[name] = f as RuntimeFn;
  };
  for (const key of Object.keys(DENSITY_TABLE)) {
    const d = DENSITY_TABLE[key];
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
  const d = Object.prototype.hasOwnProperty.call(DENSITY_TABLE, lang) ? DENSITY_TABLE[lang] : undefined;
  if (!d) throw new Error(`no density ${lang}`);
  return grad ? d.gradFn : d.valueFn;
}

export function densityInfo(lang: string) {
  return Object.prototype.hasOwnProperty.call(DENSITY_TABLE, lang) ? DENSITY_TABLE[lang] : undefined;
}

/** Runtime member names for a math function: value and value-with-derivative. */
export function mathFn(lang: string, grad: boolean): string {
  const m = Object.prototype.hasOwnProperty.call(MATH_TABLE, lang) ? MATH_TABLE[lang] : undefined;
  if (!m) throw new Error(`no math function ${lang}`);
  return grad ? m.gradFn : `${m.valueFn}Value`;
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
