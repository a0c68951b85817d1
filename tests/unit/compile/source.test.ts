/**
 * The generated JavaScript contains only our own identifiers, numeric literals and the runtime
 * object — never user names or user text — and no string literal other than the strict-mode
 * directive.
 */
import { describe, expect, it } from 'vitest';
import { RUNTIME } from '../../../server/engine/compile/runtime';
import { CompileError } from '../../../server/engine/compile/index';
import { category, compile, numeric, table } from './helpers';

const JS_WORDS = new Set(['use', 'strict', 'const', 'let', 'for', 'return', 'function', 'compiled', 'new', 'Float64Array', 'Math', 'exp', 'log', 'sqrt', 'pow', 'fill', 'theta', 'grad', 'out', 'R', 'C', 'P', 'Q', 'lp', 'Infinity', 'NaN', 'NAN_', 'INF_', 'NINF_']);
const GENERATED = /^(?:K|v|a|V|A|s|j|i|x|g|e|y|b|q|d|c|r|z|ls|iv)\d+(?:[a-z]|\d)*$/;

function identifiers(src: string): string[] {
  // drop numeric literals first (1e-3 would otherwise yield "e")
  const noNums = src.replace(/\b\d+(?:\.\d+)?(?:e[+-]?\d+)?\b/g, '0');
  return noNums.match(/[A-Za-z_$][\w$]*/g) ?? [];
}

function assertClean(src: string, userWords: string[]) {
  for (const w of userWords) expect(src.includes(w), `user word ${w} leaked into generated source`).toBe(false);
  const strings = src.match(/["'`][^"'`]*["'`]/g) ?? [];
  expect(strings).toEqual(['"use strict"']);
  const runtime = new Set(Object.keys(RUNTIME));
  for (const id of identifiers(src)) {
    const ok = JS_WORDS.has(id) || GENERATED.test(id) || runtime.has(id);
    expect(ok, `unexpected identifier ${id} in generated source`).toBe(true);
  }
  // Runtime members are only reached as R.<name>; nothing else is called through a property.
  for (const m of src.matchAll(/([A-Za-z_$][\w$]*)\.([A-Za-z_$][\w$]*)/g)) {
    expect(['R', 'Math'].includes(m[1]) || m[2] === 'fill', `property access ${m[0]}`).toBe(true);
    if (m[1] === 'R') expect(runtime.has(m[2])).toBe(true);
  }
}

describe('generated source', () => {
  const tables = {
    kiwi_orchard: table({
      pear_yield: numeric([1.2, 0.4, 2.2, 1.7]),
      shade_hours: numeric([3, 1, 0.5, 2]),
      terrace: category([1, 2, 2, 1], ['upper', 'lower']),
    }),
  };
  const src = [
    '# comment with "quotes" and `backticks` and constructor __proto__',
    'table kiwi_orchard',
    'unknown zebra_secret[2], marmot_scale, hedgehog[2]',
    'const wombat = [0.25, 0.75]',
    'let quokka = [shade_hours, pear_yield]',
    'term ld_normal(pear_yield, quokka * zebra_secret + hedgehog[terrace], exp(marmot_scale))',
    'term ld_dirichlet([0.3, 0.7], exp(hedgehog)) + log_sum_exp(hedgehog) + dot(wombat, cumsum(hedgehog))',
    'term ld_student_t(zebra_secret, 4, 0, 2.5e-1) + 0.5 * square(kiwi_orchard.shade_hours[2] * marmot_scale)',
    'constrain zebra_secret[1] <= zebra_secret[2]',
    'derive platypus = zebra_secret[2] - zebra_secret[1]',
  ].join('\n');
  const userWords = ['kiwi', 'pear', 'shade', 'terrace', 'zebra', 'marmot', 'hedgehog', 'wombat', 'quokka', 'platypus', 'comment', 'constructor', '__proto__', 'upper', 'lower'];

  it('of the log-density and the derived quantities holds only generated names and numbers', () => {
    const m = compile(src, tables);
    assertClean(m.source, userWords);
    assertClean(m.derivedSource!, userWords);
    expect(m.names).toEqual(['zebra_secret[1]', 'zebra_secret[2]', 'marmot_scale', 'hedgehog[1]', 'hedgehog[2]']);
  });

  it('keeps data values out of the source (they live in closure arrays)', () => {
    const m = compile(src, tables);
    expect(m.source.includes('1.7')).toBe(false);
    expect(m.source.includes('2.2')).toBe(false);
  });

  it('a program with hostile names never reaches code generation', () => {
    const hostile = [
      'unknown constructor\nterm ld_normal(constructor, 0, 1)',
      'unknown a\nterm a + __proto__',
      'unknown a\nterm process.exit()',
      'unknown a\nterm this.a',
      'unknown a\nterm `${a}`',
      'unknown a\nterm "a" + a',
      'unknown a\nterm a; globalThis.x = 1',
      'unknown a\nterm (a => a)(1)',
      'unknown a\nterm a[constructor]',
      'unknown prototype\nterm ld_normal(prototype.constructor, 0, 1)',
    ];
    for (const h of hostile) {
      let thrown: unknown;
      try {
        compile(h);
      } catch (e) {
        thrown = e;
      }
      // `unknown constructor` and `unknown prototype` are legal names (Map-based symbol table): those compile;
      // everything else is a CompileError with line and column.
      if (thrown) {
        expect(thrown).toBeInstanceOf(CompileError);
        const ce = thrown as CompileError;
        expect(ce.messages.length).toBeGreaterThan(0);
        for (const msg of ce.messages) {
          expect(msg.line).toBeGreaterThan(0);
          expect(msg.column).toBeGreaterThan(0);
        }
      } else {
        const m = compile(h);
        assertClean(m.source, ['constructor', 'prototype']);
      }
    }
    expect((globalThis as Record<string, unknown>).x).toBeUndefined();
  });
});
