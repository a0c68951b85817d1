/** Every program block in docs/language.md checks cleanly and compiles with data of its tables. */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { checkProgram, type DataSchema } from '../../../shared/lang/index';
import { compileProgram } from '../../../server/engine/compile/index';
import { Rng } from '../../../server/engine/rng';
import type { DataTables } from '../../../server/engine/types';

const doc = readFileSync(new URL('../../../docs/language.md', import.meta.url), 'utf8');
const blocks = [...doc.matchAll(/```\n([\s\S]*?)```/g)].map((m) => m[1]);

const schema: DataSchema = {
  harvest: { rows: 9, columns: { kg: { type: 'numeric' }, field: { type: 'category', levels: 3 } } },
  cupping: { rows: 30, columns: { bitterness: { type: 'numeric' } } },
  gauge: { rows: 120, columns: { turbidity: { type: 'numeric' }, season: { type: 'category', levels: 4 } } },
  plots: {
    rows: 60,
    columns: { set: { type: 'integer' }, inspected: { type: 'integer' }, water: { type: 'numeric' }, shade: { type: 'numeric' }, slope: { type: 'numeric' } },
  },
};

function fakeData(): DataTables {
  const rng = new Rng(7);
  const out: DataTables = {};
  for (const [t, s] of Object.entries(schema)) {
    const columns: DataTables[string]['columns'] = {};
    for (const [c, col] of Object.entries(s.columns)) {
      const v = new Float64Array(s.rows);
      for (let i = 0; i < s.rows; i++) {
        if (col.type === 'category') v[i] = 1 + (i % col.levels!);
        else if (c === 'inspected') v[i] = 10;
        else if (c === 'set') v[i] = i % 11;
        else v[i] = 0.5 + 3 * rng.uniform();
      }
      columns[c] = col.type === 'category' ? { type: 'category', values: v, levels: Array.from({ length: col.levels! }, (_, k) => `L${k + 1}`) } : { type: col.type, values: v };
    }
    out[t] = { rows: s.rows, columns };
  }
  return out;
}

describe('docs/language.md', () => {
  it('has the intro block and three worked examples', () => {
    expect(blocks.length).toBeGreaterThanOrEqual(4);
  });
  it.each(blocks.map((b, i) => [i, b]))('block %i checks and compiles', (_i, block) => {
    const r = checkProgram(block as string, schema);
    expect(r.messages).toEqual([]);
    const m = compileProgram(block as string, fakeData());
    // an interior point: shares on the simplex, everything else 0.2
    const theta = Float64Array.from(m.names, (n) => (n.startsWith('share[') ? 1 / 3 : 0.2));
    const g = new Float64Array(m.dim);
    expect(Number.isFinite(m.logDensity(theta, g))).toBe(true);
  });
});
