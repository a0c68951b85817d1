/**
 * Generated malformed programs: each gives at least one error message with a line and column on
 * the damaged line, and checkProgram never throws.
 */
import { describe, expect, it } from 'vitest';
import { checkProgram, type DataSchema, type LangMessage } from '../../../shared/lang/index';

const schema: DataSchema = {
  orchard: {
    rows: 12,
    columns: { crop: { type: 'numeric' }, shade: { type: 'numeric' }, row: { type: 'category', levels: 4 }, picked: { type: 'integer' }, trees: { type: 'integer' } },
  },
};

const base = [
  'table orchard',
  'unknown mu[4], sigma, beta[2], p',
  'const spread = 2.5',
  'let X = [shade, crop]',
  'term ld_normal(crop, mu[row] + beta[1] * shade, sigma)',
  'term ld_normal(mu, 10, spread) + ld_halfnormal(sigma, 3)',
  'term ld_binomial(picked, trees, p) + ld_beta(p, 2, 2)',
  'term sum(log_logistic(X * beta))',
  'constrain mu[1] <= mu[2] <= mu[3] <= mu[4]',
  'constrain 0 <= p <= 1',
  'constrain sum(beta) == 1',
  'derive lift = mu[4] - mu[1]',
];

function wellFormed(m: LangMessage, lines: number) {
  expect(Number.isInteger(m.line)).toBe(true);
  expect(m.line).toBeGreaterThanOrEqual(1);
  expect(m.line).toBeLessThanOrEqual(lines);
  expect(m.column).toBeGreaterThanOrEqual(1);
  expect(m.endColumn).toBeGreaterThan(m.column);
  expect(typeof m.message).toBe('string');
  expect(m.message.length).toBeGreaterThan(3);
}

interface Mutant {
  what: string;
  line: number; // 1-based damaged line
  text: string;
}

function mutants(): Mutant[] {
  const out: Mutant[] = [];
  const replaceLine = (i: number, text: string, what: string) => out.push({ what, line: i + 1, text: base.map((l, k) => (k === i ? text : l)).join('\n') });
  // 1. Truncations right after an opening bracket, comma, operator or `=` (always incomplete).
  base.forEach((l, i) => {
    for (let c = 1; c < l.length; c++) {
      const prefix = l.slice(0, c);
      if (/(\(|\[|,|\+|\*|-|<=|==|=)\s*$/.test(prefix) && !/^\s*table/.test(l)) replaceLine(i, prefix, `truncated line ${i + 1} at ${c}`);
    }
  });
  // 2. Bad tokens inserted after the keyword of each expression line.
  const bad = ['$', '@', '"x"', "'x'", '`x`', ';', '{', '}', '%', '!', '?', '&&', '||', '\\', '~', '0x1F', '1..2', '1e', '=>', '€', 'a b'];
  base.forEach((l, i) => {
    if (i < 4) return;
    const sp = l.indexOf(' ') + 1;
    for (const b of bad) replaceLine(i, `${l.slice(0, sp)}${b} ${l.slice(sp)}`, `bad token ${b} on line ${i + 1}`);
  });
  // 3. Wrong arity.
  const arity = [
    'term ld_normal(crop, sigma)',
    'term ld_normal(crop, mu[row], sigma, 1)',
    'term ld_halfnormal(sigma)',
    'term exp(sigma, 2)',
    'term pow(sigma)',
    'term sum()',
    'term dot(beta)',
    'term ld_dirichlet(beta)',
    'term ld_binomial(picked, p)',
    'term log_sum_exp(beta, mu)',
  ];
  for (const a of arity) replaceLine(6, a, `arity: ${a}`);
  // 4. Wrong shapes.
  const shapes = [
    'term ld_normal(crop, beta, sigma)',
    'term mu',
    'term crop * beta',
    'term dot(mu, beta)',
    'term sum(X)',
    'term sum(X * mu)',
    'term sum(X + beta)',
    'term ld_multinomial(picked, beta)',
    'term ld_dirichlet(mu, beta)',
    'constrain mu <= beta',
    'constrain X <= 1',
    'term ld_normal(crop, mu[picked] + mu, sigma)',
  ];
  for (const s of shapes) replaceLine(6, s, `shape: ${s}`);
  // 5. Unknown and hostile names.
  const names = ['sigam', 'mue', 'constructor', '__proto__', 'process', 'this', 'prototype', 'window', 'require', 'import', 'orchard', 'crops', 'orchard.cropp', 'orchad.crop', 'Math', 'toString'];
  for (const n of names) replaceLine(6, `term ld_normal(crop, ${n}, sigma)`, `name: ${n}`);
  // 6. Bad indices.
  const idx = ['mu[0]', 'mu[5]', 'mu[1.5]', 'mu[sigma]', 'mu[-1]', 'mu[crop]', 'sigma[1]', 'mu[[1, 5]]', 'mu[1][1]', 'mu[]', 'mu[1, 2]', 'X[1]'];
  for (const n of idx) replaceLine(6, `term ld_normal(1, ${n}, sigma)`, `index: ${n}`);
  // 7. Statement-level damage.
  const stm = [
    ['unknown', 1],
    ['unknown mu[0]', 1],
    ['unknown mu[2.5]', 1],
    ['unknown mu[', 1],
    ['unknown 3', 1],
    ['unknown mu sigma', 1],
    ['unknown mu,', 1],
    ['unknown term', 1],
    ['table', 0],
    ['table orchard extra', 0],
    ['table nowhere', 0],
    ['terms ld_normal(1, 0, 1)', 6],
    ['constrian p >= 0', 9],
    ['constrain p', 9],
    ['constrain p >= ', 9],
    ['constrain >= p', 9],
    ['derive', 11],
    ['derive = mu[1]', 11],
    ['derive lift mu[1]', 11],
    ['derive lift == mu[1]', 11],
    ['const spread = sigma', 2],
    ['const spread = crop', 2],
    ['let = 1', 3],
    ['let X = [shade, mu]', 3],
    ['let X = [shade, 1]', 3],
  ] as const;
  for (const [t, i] of stm) replaceLine(i, t, `statement: ${t}`);
  return out;
}

describe('malformed programs', () => {
  const all = mutants();
  it(`there are at least 200 of them (${all.length})`, () => {
    expect(all.length).toBeGreaterThanOrEqual(200);
  });
  it('the undamaged program is clean', () => {
    expect(checkProgram(base.join('\n'), schema).messages).toEqual([]);
  });
  it('each gives a well-formed error on the damaged line and never throws', () => {
    const failures: string[] = [];
    for (const m of all) {
      let r;
      try {
        r = checkProgram(m.text, schema);
      } catch (e) {
        failures.push(`${m.what}: threw ${String(e)}`);
        continue;
      }
      const errs = r.messages.filter((x) => x.severity === 'error');
      if (r.ok || errs.length === 0) {
        failures.push(`${m.what}: no error`);
        continue;
      }
      for (const e of r.messages) wellFormed(e, base.length);
      if (!errs.some((e) => e.line === m.line)) failures.push(`${m.what}: no error on line ${m.line} (${errs.map((e) => `${e.line}: ${e.message}`).join(' | ')})`);
    }
    expect(failures).toEqual([]);
  });
});

