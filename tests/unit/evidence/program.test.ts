/**
 * Program helpers of the evidence (server/engine/evidence/program.ts): the prior-only source follows
 * the term roles of docs/language.md (likelihood lines removed, `:: prior` kept), and hypotheses
 * accept inequality constrain lines only. A prior that is centred on the data's mean but marked
 * `:: prior` is kept in the prior: its ordering mass is still 1/3! (exchangeable means, symmetry,
 * common practice).
 */
import { describe, expect, it } from 'vitest';
import { priorOnlySource, testHypothesis } from '../../../server/engine/evidence/program';
import type { DataTables } from '../../../server/engine/types';

const tables: DataTables = {
  d: {
    rows: 6,
    columns: {
      y: { type: 'numeric', values: Float64Array.from([0.1, -0.4, 0.5, 0.9, 1.2, 1.0]) },
      g: { type: 'category', values: Float64Array.from([1, 1, 2, 2, 3, 3]), levels: ['a', 'b', 'c'] },
    },
  },
};

const SRC = [
  'table d',
  'unknown mu[3]',
  'term ld_normal(y, mu[g], 1)',
  'term ld_normal(mu, mean(y), 2) :: prior',
  'constrain mu[1] <= mu[2] <= mu[3]',
  'constrain sum(mu) == 1.5',
].join('\n');

describe('evidence of programs', { timeout: 60_000 }, () => {
  it('the prior-only source drops likelihood lines and keeps lines marked :: prior', () => {
    const r = priorOnlySource(SRC, tables);
    expect(r.likelihoodLines).toEqual([3]);
    const lines = r.source.split('\n');
    expect(lines[2]).toBe('');
    expect(lines[3]).toContain(':: prior');
    expect(lines.length).toBe(6);
  });

  it('prior mass of an ordering under a data-centred prior marked :: prior is 1/3!', () => {
    const src = SRC.split('\n').slice(0, 5).join('\n');
    const h = testHypothesis(src, tables, [5], { replicates: 6, seed: 61 });
    expect(Math.abs(h.prior.log + Math.log(6))).toBeLessThanOrEqual(3 * h.prior.se);
  });

  it('refuses equality lines and lines that are not constraints', () => {
    expect(() => testHypothesis(SRC, tables, [6])).toThrow(/equality/);
    expect(() => testHypothesis(SRC, tables, [4])).toThrow(/not a constrain line/);
  });
});
