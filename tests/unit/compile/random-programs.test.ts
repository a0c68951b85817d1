/**
 * Property test of the code generator: random well-typed, smooth programs (fast-check, fixed seed)
 * mixing scalars, unknown vectors, data rows, gathers, matrix products, reductions, cumsum/diff and
 * log-densities. The compiled gradient must match central finite differences (Richardson step,
 * common practice) to relative error < 1e-6, and the compiled value must match a second compile of
 * the same program written with every `let` inlined.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { DataTables } from '../../../server/engine/types';
import { category, compile, gradError, numeric, table, value } from './helpers';

const tables: DataTables = {
  obs: table({
    x: numeric([0.4, -0.8, 1.1]),
    z: numeric([1.5, 0.3, -0.6]),
    g: category([2, 1, 3], ['a', 'b', 'c']),
  }),
};

// Smooth, everywhere-defined building blocks (arguments kept moderate by 0.3 factors).
const S1 = ['softplus', 'logistic', 'log_logistic', 'square'];
const scalarLeaf = fc.constantFrom('a', 'b', 'w[1]', 'w[3]', '0.7', '1.3', 'u[2]');
const vecLeaf = fc.constantFrom('w', 'u', 'x', 'z', 'w[g]', 'u[g]', 'X * w', 'cumsum(w)', '[a, b, 0.5]');

const { scalar, vector } = fc.letrec<{ scalar: string; vector: string }>((tie) => ({
  scalar: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    scalarLeaf,
    fc.tuple(fc.constantFrom(...S1), tie('scalar')).map(([f, e]) => `${f}(0.3 * (${e}))`),
    fc.tuple(tie('scalar'), fc.constantFrom('+', '-', '*'), tie('scalar')).map(([l, op, r]) => `(${l}) ${op} (${r})`),
    fc.tuple(tie('scalar'), tie('scalar')).map(([l, r]) => `(${l}) / (1 + square(${r}))`),
    tie('vector').map((v) => `sum(${v})`),
    tie('vector').map((v) => `mean(${v})`),
    tie('vector').map((v) => `log_sum_exp(0.3 * (${v}))`),
    fc.tuple(tie('vector'), tie('vector')).map(([p, q]) => `dot(${p}, ${q})`),
    tie('vector').map((v) => `sum(diff(${v}))`),
    fc.tuple(tie('vector'), tie('scalar')).map(([v, s]) => `ld_normal(${v}, ${s}, 1 + softplus(0.3 * (${s})))`),
    fc.tuple(tie('vector'), tie('vector')).map(([v, m]) => `ld_normal(x, ${m}, 1 + softplus(0.3 * (${v})))`),
    fc.tuple(tie('scalar'), tie('scalar')).map(([l, r]) => `ld_student_t(${l}, 5, ${r}, 2)`),
    tie('vector').map((v) => `ld_poisson(k, exp(0.3 * (${v})))`),
  ),
  vector: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    vecLeaf,
    fc.tuple(fc.constantFrom(...S1, 'exp'), tie('vector')).map(([f, e]) => `${f}(0.3 * (${e}))`),
    fc.tuple(tie('vector'), fc.constantFrom('+', '-', '*'), fc.oneof(tie('vector'), tie('scalar'))).map(([l, op, r]) => `(${l}) ${op} (${r})`),
    fc.tuple(tie('scalar'), tie('vector')).map(([s, v]) => `(${s}) - (${v})`),
    tie('vector').map((v) => `cumsum(${v})`),
    fc.tuple(tie('vector'), tie('vector')).map(([l, r]) => `(${l}) / (2 + square(${r}))`),
    tie('vector').map((v) => `(${v}) ^ 2`),
  ),
}));

const header = 'table obs\nunknown a, b, w[3], u[3]\nconst k = [1, 0, 4]\nlet X = [x, z, x * z]\n';
const tablesK: DataTables = tables;

describe('random smooth programs', () => {
  it('compiled gradients match finite differences', () => {
    let checked = 0;
    fc.assert(
      fc.property(
        fc.array(scalar, { minLength: 1, maxLength: 3 }),
        fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 8, maxLength: 8 }),
        (terms, th) => {
          const src = header + terms.map((t) => `term ${t}`).join('\n') + '\nderive d = ' + terms[0];
          const m = compile(src, tablesK);
          const { err, v, fd } = gradError(m, th);
          if (!Number.isFinite(v) || fd.some((x) => !Number.isFinite(x)) || Math.abs(v) > 1e6) return; // outside the smooth region
          checked++;
          expect(err, src).toBeLessThan(1e-6);
          // the derived function evaluates the first term the same way (value path only)
          const out = new Float64Array(1);
          m.derived!.evaluate(Float64Array.from(th), out);
          const alone = compile(header + `term ${terms[0]}`, tablesK);
          expect(Math.abs(out[0] - value(alone, th))).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(out[0])));
        },
      ),
      { seed: 777, numRuns: 200 },
    );
    expect(checked).toBeGreaterThan(130);
  }, 120_000);
});
