/**
 * Every partial derivative against central finite differences (with one Richardson step, see
 * helpers.ts) at random points drawn with a fixed seed; relative error < 1e-6 (absolute floor 1e-8
 * for partials near 0). Discrete arguments must report partial 0. The value returned by each
 * Grad function must equal the plain function's value exactly.
 */
import { describe, expect, it } from 'vitest';
import * as D from '../../../server/engine/densities';
import { DENSITY_TABLE, FUSED_DENSITY_TABLE, MATH_TABLE } from '../../../server/engine/densities';
import { Rng } from '../../../server/engine/rng';
import { centralDiff, expectPartial } from './helpers';

const rng = new Rng(20261202);
const U = (a: number, b: number) => a + (b - a) * rng.uniform();
const I = (a: number, b: number) => a + Math.floor((b - a + 1) * rng.uniform());

/** Finite-difference step per argument kind: relative for positive arguments, else ~1e-3. */
type Kind = 'real' | 'pos' | 'unit' | 'discrete';

interface Case {
  name: string;
  kinds: Kind[];
  draw: () => number[];
}

const CASES: Case[] = [
  { name: 'ld_normal', kinds: ['real', 'real', 'pos'], draw: () => [U(-5, 5), U(-3, 3), U(0.2, 4)] },
  { name: 'ld_student_t', kinds: ['real', 'pos', 'real', 'pos'], draw: () => [U(-5, 5), U(0.5, 30), U(-3, 3), U(0.2, 4)] },
  { name: 'ld_cauchy', kinds: ['real', 'real', 'pos'], draw: () => [U(-5, 5), U(-3, 3), U(0.2, 4)] },
  { name: 'ld_laplace', kinds: ['real', 'real', 'pos'], draw: () => [U(-5, 5), U(-3, 3), U(0.2, 4)] },
  { name: 'ld_logistic', kinds: ['real', 'real', 'pos'], draw: () => [U(-5, 5), U(-3, 3), U(0.2, 4)] },
  { name: 'ld_lognormal', kinds: ['pos', 'real', 'pos'], draw: () => [U(0.05, 20), U(-1, 2), U(0.2, 2)] },
  { name: 'ld_gamma', kinds: ['pos', 'pos', 'pos'], draw: () => [U(0.05, 20), U(0.3, 10), U(0.1, 5)] },
  { name: 'ld_exponential', kinds: ['pos', 'pos'], draw: () => [U(0.01, 10), U(0.1, 5)] },
  { name: 'ld_beta', kinds: ['unit', 'pos', 'pos'], draw: () => [U(0.02, 0.98), U(0.3, 10), U(0.3, 10)] },
  { name: 'ld_halfnormal', kinds: ['pos', 'pos'], draw: () => [U(0.01, 10), U(0.2, 5)] },
  { name: 'ld_poisson', kinds: ['discrete', 'pos'], draw: () => [I(0, 30), U(0.1, 30)] },
  { name: 'ld_poisson∘exp', kinds: ['discrete', 'real'], draw: () => [I(0, 30), U(-3, 4)] },
  {
    name: 'ld_binomial',
    kinds: ['discrete', 'discrete', 'unit'],
    draw: () => {
      const n = I(0, 50);
      return [I(0, n), n, U(0.02, 0.98)];
    },
  },
  {
    name: 'ld_binomial∘logistic',
    kinds: ['discrete', 'discrete', 'real'],
    draw: () => {
      const n = I(0, 50);
      return [I(0, n), n, U(-6, 6)];
    },
  },
  { name: 'ld_bernoulli', kinds: ['discrete', 'unit'], draw: () => [I(0, 1), U(0.02, 0.98)] },
  { name: 'ld_bernoulli∘logistic', kinds: ['discrete', 'real'], draw: () => [I(0, 1), U(-8, 8)] },
];

function step(kind: Kind, x: number): number {
  if (kind === 'pos') return 1e-3 * x;
  if (kind === 'unit') return 1e-3 * Math.min(x, 1 - x);
  return 1e-3 * Math.max(1, Math.abs(x));
}

describe('scalar log-densities: partials against central differences', () => {
  it('covers every scalar density in DENSITY_TABLE and every fused kernel', () => {
    const scalarNames = [...Object.values(DENSITY_TABLE), ...Object.values(FUSED_DENSITY_TABLE)]
      .filter((d) => d.kind === 'scalar')
      .map((d) => d.name)
      .sort();
    expect(CASES.map((c) => c.name).sort()).toEqual(scalarNames);
  });

  for (const c of CASES) {
    it(`${c.name}: 40 random points`, () => {
      const info = Object.prototype.hasOwnProperty.call(DENSITY_TABLE, c.name) ? DENSITY_TABLE[c.name] : FUSED_DENSITY_TABLE[c.name];
      if (info.kind !== 'scalar') throw new Error('expected a scalar density');
      expect(info.args.map((a) => a.discrete)).toEqual(c.kinds.map((k) => k === 'discrete'));
      const f = info.value;
      const grad = info.grad as unknown as (...a: (number | Float64Array)[]) => number;
      const n = c.kinds.length;
      const out = new Float64Array(n + 2);
      for (let t = 0; t < 40; t++) {
        const args = c.draw();
        if (c.name === 'ld_laplace' && Math.abs(args[0] - args[1]) < 0.05) continue; // kink at y = μ
        out.fill(123);
        const v = grad(...args, out, 1);
        expect(v).toBe(f(...args));
        expect(Number.isFinite(v)).toBe(true);
        expect(out[0]).toBe(123);
        expect(out[n + 1]).toBe(123);
        for (let i = 0; i < n; i++) {
          const what = `${c.name}(${args.map((a) => a.toFixed(4)).join(', ')}) ∂${info.args[i].name}`;
          if (c.kinds[i] === 'discrete') {
            expect(out[1 + i], what).toBe(0);
            continue;
          }
          const g = (x: number) => {
            const a = args.slice();
            a[i] = x;
            return f(...a);
          };
          expectPartial(out[1 + i], centralDiff(g, args[i], step(c.kinds[i], args[i])), what);
        }
      }
    });
  }
});

describe('vector log-densities: partials against central differences', () => {
  it('dirichlet: ∂α directly, ∂x along simplex directions eᵢ − e_K (the only moves that stay on it)', () => {
    const K = 4;
    const out = new Float64Array(2 * K);
    for (let t = 0; t < 30; t++) {
      const raw = Array.from({ length: K }, () => U(0.2, 1));
      const s = raw.reduce((p, q) => p + q, 0);
      const x = new Float64Array(raw.map((r) => r / s));
      const alpha = new Float64Array(Array.from({ length: K }, () => U(0.4, 8)));
      const v = D.dirichletLpdfGrad(x, 0, alpha, 0, K, out, 0);
      expect(v).toBe(D.dirichletLpdf(x, 0, alpha, 0, K));
      for (let i = 0; i < K; i++) {
        const g = (a: number) => {
          const al = alpha.slice();
          al[i] = a;
          return D.dirichletLpdf(x, 0, al, 0, K);
        };
        expectPartial(out[K + i], centralDiff(g, alpha[i], 1e-3 * alpha[i]), `dirichlet ∂α${i + 1}`);
      }
      for (let i = 0; i < K - 1; i++) {
        const h = 1e-3 * Math.min(x[i], x[K - 1]);
        const g = (e: number) => {
          const xx = x.slice();
          xx[i] += e;
          xx[K - 1] -= e;
          return D.dirichletLpdf(xx, 0, alpha, 0, K);
        };
        expectPartial(out[i] - out[K - 1], centralDiff(g, 0, h), `dirichlet ∂x${i + 1} − ∂x${K}`);
      }
    }
  });

  it('multinomial: ∂counts = 0, ∂p along simplex directions eᵢ − e_K', () => {
    const K = 3;
    const out = new Float64Array(2 * K);
    for (let t = 0; t < 30; t++) {
      const raw = Array.from({ length: K }, () => U(0.1, 1));
      const s = raw.reduce((p, q) => p + q, 0);
      const p = new Float64Array(raw.map((r) => r / s));
      const k = new Float64Array(Array.from({ length: K }, () => I(0, 20)));
      const v = D.multinomialLpmfGrad(k, 0, p, 0, K, out, 0);
      expect(v).toBe(D.multinomialLpmf(k, 0, p, 0, K));
      for (let i = 0; i < K; i++) expect(out[i]).toBe(0);
      for (let i = 0; i < K - 1; i++) {
        const h = 1e-3 * Math.min(p[i], p[K - 1]);
        const g = (e: number) => {
          const pp = p.slice();
          pp[i] += e;
          pp[K - 1] -= e;
          return D.multinomialLpmf(k, 0, pp, 0, K);
        };
        expectPartial(out[K + i] - out[2 * K - 1], centralDiff(g, 0, h), `multinomial ∂p${i + 1} − ∂p${K}`);
      }
    }
  });
});

describe('math functions: derivatives against central differences', () => {
  const DOMAINS: Record<string, () => number[]> = {
    exp: () => [U(-5, 5)],
    log: () => [U(0.1, 10)],
    log1p: () => [U(-0.9, 5)],
    expm1: () => [U(-5, 5)],
    sqrt: () => [U(0.1, 10)],
    square: () => [U(-5, 5)],
    abs: () => [(rng.uniform() < 0.5 ? -1 : 1) * U(0.1, 5)],
    logistic: () => [U(-10, 10)],
    log_logistic: () => [U(-20, 20)],
    softplus: () => [U(-20, 20)],
    lgamma: () => [rng.uniform() < 0.8 ? U(0.1, 30) : U(-2.9, -2.1)],
    pow: () => [U(0.1, 5), U(-3, 3)],
  };

  it('covers every entry of MATH_TABLE', () => {
    expect(Object.keys(DOMAINS).sort()).toEqual(Object.keys(MATH_TABLE).sort());
  });

  for (const name of Object.keys(DOMAINS)) {
    it(`${name}: 40 random points`, () => {
      const info = MATH_TABLE[name];
      const grad = info.grad as unknown as (...a: (number | Float64Array)[]) => number;
      const out = new Float64Array(3);
      for (let t = 0; t < 40; t++) {
        const args = DOMAINS[name]();
        const v = grad(...args, out, 1);
        expect(v).toBe(info.value(...args));
        for (let i = 0; i < info.arity; i++) {
          const g = (x: number) => {
            const a = args.slice();
            a[i] = x;
            return info.value(...a);
          };
          const h = name === 'lgamma' && args[0] < 0 ? 1e-4 : 1e-3 * Math.max(0.1, Math.min(1, Math.abs(args[i])));
          expectPartial(out[1 + i], centralDiff(g, args[i], h), `${name}(${args.join(', ')}) ∂${i}`);
        }
      }
    });
  }

  it('log_sum_exp (vector and two-argument): softmax gradient against central differences', () => {
    const n = 5;
    const x = new Float64Array(n + 2);
    const out = new Float64Array(n);
    for (let t = 0; t < 30; t++) {
      for (let i = 0; i < x.length; i++) x[i] = U(-5, 5);
      const v = D.logSumExpGrad(x, 2, n, out, 0);
      expect(v).toBe(D.logSumExp(x, 2, n));
      let s = 0;
      for (let i = 0; i < n; i++) {
        s += out[i];
        const g = (z: number) => {
          const xx = x.slice();
          xx[2 + i] = z;
          return D.logSumExp(xx, 2, n);
        };
        expectPartial(out[i], centralDiff(g, x[2 + i], 1e-3), `log_sum_exp ∂${i}`);
      }
      expect(Math.abs(s - 1)).toBeLessThan(1e-14);
      const o2 = new Float64Array(2);
      const a = x[0];
      const b = x[1];
      D.logSumExp2Grad(a, b, o2, 0);
      expectPartial(o2[0], centralDiff((z) => D.logSumExp2(z, b), a, 1e-3), 'logSumExp2 ∂a');
      expectPartial(o2[1], centralDiff((z) => D.logSumExp2(a, z), b, 1e-3), 'logSumExp2 ∂b');
    }
  });
});
