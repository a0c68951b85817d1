/**
 * Level names for elements of unknowns gathered by a category column. The coding rule checked
 * against is the data reader's own documented one (shared/data/csv.ts: levels sorted in natural
 * order, coded 1..K), parsed here from a CSV so the labels follow the codes the fit used.
 */
import { describe, expect, it } from 'vitest';
import { checkProgram, categoryIndexes, elementLabels, type DataSchema } from '../../../shared/lang/index';
import { parseCsv } from '../../../shared/data';

const csv = parseCsv('site,arm,y\nsouth,b,1.2\nnorth,a,0.8\neast,b,1.1\nnorth,a,0.9\n');
const table = csv.table!;
const schema: DataSchema = {
  survey: {
    rows: table.rows,
    columns: {
      site: { type: 'category', levels: table.columns.site.levels!.length },
      arm: { type: 'category', levels: table.columns.arm.levels!.length },
      y: { type: 'numeric' },
    },
  },
};
const levelsOf = (t: string, c: string) => (t === 'survey' ? table.columns[c]?.levels : undefined);

describe('element labels from category columns', () => {
  it('labels each element of an unknown gathered by a category column with the level of its code', () => {
    // Natural order: east, north, south → codes 1, 2, 3.
    expect(table.columns.site.levels).toEqual(['east', 'north', 'south']);
    const r = checkProgram('table survey\nunknown share[3]\nunknown sigma\nterm ld_normal(y, share[site], sigma)\nconstrain sigma >= 0.01', schema);
    expect(r.ok).toBe(true);
    expect([...categoryIndexes(r.program)]).toEqual([['share', [{ table: 'survey', column: 'site' }]]]);
    const labels = elementLabels(r.program, r.unknowns, levelsOf);
    expect(Object.fromEntries(labels)).toEqual({ 'share[1]': 'share[1] (east)', 'share[2]': 'share[2] (north)', 'share[3]': 'share[3] (south)' });
    // Row 1 is "south" (code 3): share[site] for row 1 reads share[3], labelled south.
    expect(table.columns.site.values[0]).toBe(3);
  });

  it('works through let lines and qualified columns, and leaves other unknowns alone', () => {
    const r = checkProgram('table survey\nunknown mu[2]\nunknown tau[4]\nlet m = mu[survey.arm]\nterm ld_normal(y, m, 1)\nterm ld_normal(tau, 0, 1)', schema);
    expect(r.ok).toBe(true);
    expect(Object.fromEntries(elementLabels(r.program, r.unknowns, levelsOf))).toEqual({ 'mu[1]': 'mu[1] (a)', 'mu[2]': 'mu[2] (b)' });
  });

  it('gives no labels when two columns with different levels gather the same unknown', () => {
    const r = checkProgram('table survey\nunknown mu[3]\nterm ld_normal(y, mu[site], 1)\nterm ld_normal(y, mu[arm], 1)', schema);
    expect(r.ok).toBe(true);
    expect(elementLabels(r.program, r.unknowns, levelsOf).size).toBe(0);
  });

  it('gives no labels for a literal index or an integer column', () => {
    const r = checkProgram('unknown mu[2]\nterm ld_normal(mu[1], 0, 1) + ld_normal(mu[2], 0, 1)', {});
    expect(elementLabels(r.program, r.unknowns, levelsOf).size).toBe(0);
  });
});
