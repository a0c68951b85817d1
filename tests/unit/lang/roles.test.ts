/**
 * Term roles (shared/lang/roles.ts): the rule of docs/language.md — a term line that reads a table
 * column is likelihood, one that does not is prior — and the explicit `:: prior` / `:: likelihood`
 * marker. The expected roles follow from the rule as documented (the product's own definition).
 */
import { describe, expect, it } from 'vitest';
import { checkProgram, termRoles } from '../../../shared/lang';

const schema = { harvest: { rows: 3, columns: { kg: { type: 'numeric' as const }, field: { type: 'category' as const, levels: 3 } } } };

describe('term roles', () => {
  it('classifies by whether a column is read, directly, by a gather, a qualified name or a let', () => {
    const src = [
      'table harvest',
      'unknown mu[3], sigma',
      'let m = mu[field]',
      'term ld_normal(kg, m, sigma)',
      'term ld_normal(mu, 40, 20) + ld_halfnormal(sigma, 10)',
      'term -0.5 * square(harvest.kg[1] - mu[1])',
      'term sum(mu[field]) * 0',
      'term ld_normal(mu[1], 0, 1)',
    ].join('\n');
    const c = checkProgram(src, schema);
    expect(c.messages.filter((m) => m.severity === 'error')).toEqual([]);
    const roles = termRoles(c.program);
    expect(roles.map((r) => [r.line, r.role, r.explicit])).toEqual([
      [4, 'likelihood', false],
      [5, 'prior', false],
      [6, 'likelihood', false],
      [7, 'likelihood', false],
      [8, 'prior', false],
    ]);
    expect(roles[0].columns).toEqual(['harvest.field', 'harvest.kg']);
  });

  it('a trailing :: prior or :: likelihood overrides the rule', () => {
    const src = [
      'table harvest',
      'unknown mu[3], sigma',
      'term ld_normal(mu, mean(kg), 10) :: prior',
      'term ld_halfnormal(sigma, 1) :: likelihood',
      'term ld_normal(kg, mu[field], sigma)   :: likelihood   # a comment after the marker',
    ].join('\n');
    const c = checkProgram(src, schema);
    expect(c.ok).toBe(true);
    expect(termRoles(c.program).map((r) => [r.role, r.explicit])).toEqual([
      ['prior', true],
      ['likelihood', true],
      ['likelihood', true],
    ]);
  });

  it('reports a missing or unknown role, and :: outside a term line', () => {
    const c = checkProgram('unknown a\nterm ld_normal(a, 0, 1) ::\nterm ld_normal(a, 0, 1) :: belief\nconstrain a >= 0 :: prior\n', {});
    const errs = c.messages.filter((m) => m.severity === 'error');
    expect(errs.map((m) => m.line)).toEqual([2, 3, 4]);
    expect(errs[0].message).toMatch(/role is missing/);
    expect(errs[1].message).toMatch(/`belief` is not a role/);
    expect(errs[2].message).toMatch(/::/);
  });
});
