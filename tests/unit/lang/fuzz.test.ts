/**
 * Property test over random token soups (fast-check, fixed seed): the front end never crashes,
 * every message is well-formed, expr-eval's evaluate is never called, nothing from the text runs,
 * and when a soup happens to compile, no user text reaches the generated source.
 */
import * as exprEval from 'expr-eval';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { checkProgram, type DataSchema } from '../../../shared/lang/index';
import { CompileError, compileProgram } from '../../../server/engine/compile/index';
import type { DataTables } from '../../../server/engine/types';

const schema: DataSchema = {
  hive: { rows: 3, columns: { honey: { type: 'numeric' }, frame: { type: 'category', levels: 2 }, visits: { type: 'integer' } } },
};
const tables: DataTables = {
  hive: {
    rows: 3,
    columns: {
      honey: { type: 'numeric', values: Float64Array.from([1.5, 2.5, 0.5]) },
      frame: { type: 'category', values: Float64Array.from([1, 2, 2]), levels: ['brood', 'super'] },
      visits: { type: 'integer', values: Float64Array.from([3, 0, 2]) },
    },
  },
};

const HOSTILE = ['constructor', '__proto__', 'process', 'exit', 'this', 'prototype', 'globalThis', 'eval', 'Function', 'require', 'import', 'window', 'toString', 'valueOf', '__defineGetter__', 'hasOwnProperty'];
const tokens = [
  'table', 'unknown', 'const', 'let', 'term', 'constrain', 'derive', 'hive', 'honey', 'frame', 'visits', 'hive.honey', 'w', 'w[2]', 's',
  'ld_normal', 'ld_poisson', 'ld_dirichlet', 'exp', 'log', 'sum', 'cumsum', 'dot', 'mean', 'pow',
  ...HOSTILE, 'process.exit()', 'process.exit(1)', 'this.constructor', '__proto__.polluted', 'constructor.constructor("x")()',
  '(', ')', '[', ']', ',', '.', '+', '-', '*', '/', '^', '<=', '<', '>=', '>', '==', '=', '!=', '!', '?', ':', ';', '%', '||', '&&',
  '"', "'", '`', '${', '}', '{', '=>', '#', '\\', '$', '@', '0', '1', '2.5', '1e-3', '0x10', '-1', '1e999', '\n', '\n', '\n', '  ', '€', '\u0000', '\t',
];

const soup = fc.array(fc.constantFrom(...tokens), { minLength: 1, maxLength: 40 }).map((ts) => ts.join(' '));
const structured = fc
  .tuple(fc.constantFrom('term', 'constrain', 'derive d =', 'let q =', 'const k ='), fc.array(fc.constantFrom(...tokens), { minLength: 1, maxLength: 12 }))
  .map(([kw, ts]) => `table hive\nunknown w[2], s\n${kw} ${ts.join(' ')}`);

describe('random token soups', () => {
  // expr-eval's type file declares Expression as an interface; the module exports the class.
  const ExpressionClass = (exprEval as unknown as { Expression: { prototype: { evaluate(): unknown } } }).Expression;
  const evaluateSpy = vi.spyOn(ExpressionClass.prototype, 'evaluate');
  const exitSpy = vi.spyOn(process, 'exit').mockImplementation((() => {
    throw new Error('process.exit called');
  }) as never);
  beforeAll(() => {
    evaluateSpy.mockClear();
  });
  afterAll(() => {
    exitSpy.mockRestore();
    evaluateSpy.mockRestore();
  });

  it('never crash the checker or the compiler, and never run user text', () => {
    let compiled = 0;
    fc.assert(
      fc.property(fc.oneof(soup, structured), (src) => {
        const r = checkProgram(src, schema);
        const lines = src.split('\n').length;
        for (const m of r.messages) {
          expect(m.line).toBeGreaterThanOrEqual(1);
          expect(m.line).toBeLessThanOrEqual(lines);
          expect(m.column).toBeGreaterThanOrEqual(1);
          expect(m.endColumn).toBeGreaterThan(m.column);
        }
        try {
          const model = compileProgram(src, tables);
          compiled++;
          for (const h of HOSTILE) expect(model.source.includes(h)).toBe(false);
          expect(model.source.match(/["'`]/g)?.length ?? 0).toBe(2); // only "use strict"
          model.logDensity(new Float64Array(model.dim).fill(0.5), new Float64Array(model.dim));
        } catch (e) {
          expect(e).toBeInstanceOf(CompileError);
        }
      }),
      { seed: 20261202, numRuns: 1500 },
    );
    expect(compiled).toBeGreaterThan(0);
    expect(evaluateSpy).not.toHaveBeenCalled();
    expect(exitSpy).not.toHaveBeenCalled();
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect((globalThis as Record<string, unknown>).x).toBeUndefined();
  }, 120_000);
});
