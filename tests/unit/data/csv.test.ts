import { describe, expect, it } from 'vitest';
import { decodeBytes, isModelName, modelNameFor, parseCsv } from '../../../shared/data';
import type { DataTable } from '../../../server/engine/types';

const enc = (s: string) => new TextEncoder().encode(s);

describe('parseCsv: column types', () => {
  it('detects integer, numeric and category columns (orchard plots)', () => {
    const r = parseCsv('plot,dose,yield,block\n1,0,12.5,north\n2,40,13.1,south\n3,80,1e1,north\n');
    expect(r.issues).toEqual([]);
    const t = r.table!;
    expect(t.rows).toBe(3);
    expect(t.columns.plot.type).toBe('integer');
    expect(t.columns.dose.type).toBe('integer');
    expect(t.columns.yield.type).toBe('numeric');
    expect(Array.from(t.columns.yield.values)).toEqual([12.5, 13.1, 10]);
    expect(t.columns.block).toEqual({ type: 'category', values: Float64Array.from([1, 2, 1]), levels: ['north', 'south'] });
    expect(r.columns.find((c) => c.name === 'dose')).toMatchObject({ min: 0, max: 80, missing: 0 });
    // The result is usable wherever the engine expects a DataTable.
    const asEngine: DataTable = t;
    expect(asEngine.rows).toBe(3);
  });

  it('orders category levels naturally and codes them 1..K', () => {
    const r = parseCsv('site\nbed 10\nbed 2\nbed 1\nbed 2\n');
    expect(r.table!.columns.site.levels).toEqual(['bed 1', 'bed 2', 'bed 10']);
    expect(Array.from(r.table!.columns.site.values)).toEqual([3, 2, 1, 2]);
  });

  it('treats 1.0 as integer-valued and 1.5 as numeric; signs and exponents parse', () => {
    const r = parseCsv('a,b,c\n1.0,1.5,-2e-3\n+2,2,.5\n');
    expect(r.table!.columns.a.type).toBe('integer');
    expect(r.table!.columns.b.type).toBe('numeric');
    expect(Array.from(r.table!.columns.c.values)).toEqual([-0.002, 0.5]);
  });

  it('handles quoted cells with delimiters, quotes and line breaks inside', () => {
    const r = parseCsv('name,note\n"Smith, J","said ""hi""\nthen left"\n');
    expect(r.issues).toEqual([]);
    expect(r.table!.columns.note.levels).toEqual(['said "hi"\nthen left']);
  });

  it('reads Windows line endings and tab-separated files', () => {
    const crlf = parseCsv('dose,yield\r\n1,2.5\r\n2,3.5\r\n');
    expect(crlf.issues).toEqual([]);
    expect(Array.from(crlf.table!.columns.yield.values)).toEqual([2.5, 3.5]);
    const tsv = parseCsv('dose\tyield\n1\t2.5\n2\t3.5\n');
    expect(Object.keys(tsv.table!.columns)).toEqual(['dose', 'yield']);
  });

  it('skips blank lines and trims cells', () => {
    const r = parseCsv('site , n\n\n north , 3 \n\nsouth,4\n');
    expect(r.table!.rows).toBe(2);
    expect(r.table!.columns.site.levels).toEqual(['north', 'south']);
    expect(r.table!.columns.n.type).toBe('integer');
  });

  it('detects a semicolon delimiter', () => {
    const r = parseCsv('x;y\n1;2\n3;4\n');
    expect(Array.from(r.table!.columns.y.values)).toEqual([2, 4]);
  });
});

describe('parseCsv: problems are reported with row and column', () => {
  it('missing values become NaN and are listed by row', () => {
    const r = parseCsv('dose,yield\n0,12\n40,NA\n80,\n120,14\n');
    expect(r.table).not.toBeNull();
    expect(r.table!.columns.yield.type).toBe('integer');
    expect(Number.isNaN(r.table!.columns.yield.values[1])).toBe(true);
    expect(r.columns[1]).toMatchObject({ missing: 2, missingRows: [2, 3] });
    expect(r.issues).toEqual([
      { severity: 'warning', row: 2, column: 'yield', message: 'Column "yield" has 2 missing values (rows 2, 3).' },
    ]);
  });

  it('ragged rows are errors that name the rows', () => {
    const r = parseCsv('a,b,c\n1,2,3\n4,5\n6,7,8,9\n1,2,3\n');
    expect(r.table).toBeNull();
    const msgs = r.issues.filter((i) => i.severity === 'error').map((i) => i.message);
    // Each message names its row once and says what is wrong.
    expect(msgs).toEqual(['Row 2 has 2 cells; the header has 3.', 'Row 3 has 4 cells; the header has 3.']);
    expect(r.issues.filter((i) => i.severity === 'error').map((i) => i.row)).toEqual([2, 3]);
  });

  it('ragged rows beyond the listed few are counted in one more message', () => {
    const r = parseCsv('a,b\n1\n2\n3\n4,5\n', { maxListed: 2 });
    const msgs = r.issues.filter((i) => i.severity === 'error').map((i) => i.message);
    expect(msgs).toEqual(['Row 1 has 1 cell; the header has 2.', 'Row 2 has 1 cell; the header has 2.', "1 more row has fewer cells than the header's 2."]);
    for (const m of msgs) expect(m.match(/\brow \d/gi)?.length ?? 0).toBeLessThanOrEqual(1);
  });

  it('a header of numbers is reported as a missing header', () => {
    const r = parseCsv('1,2\n3,4\n');
    expect(r.table).toBeNull();
    expect(r.issues[0].message).toMatch(/lack a header row/);
  });

  it('empty and duplicate column names are errors; unusable names are warnings', () => {
    const r = parseCsv('a,,a,yield (t/ha)\n1,2,3,4\n');
    expect(r.table).toBeNull();
    const m = r.issues.map((i) => `${i.severity}: ${i.message}`);
    expect(m).toContain('error: Column 2 has no name in the header row.');
    expect(m).toContain('error: Column name "a" appears twice (columns 1 and 3).');
    expect(m.some((s) => s.startsWith('warning: Column name "yield (t/ha)" cannot be used'))).toBe(true);
  });

  it('a column name with a space is stored with a warning naming a usable name', () => {
    const r = parseCsv('temp level,y\n1,2\n');
    expect(r.table).not.toBeNull();
    expect(r.table!.columns['temp level'].values[0]).toBe(1);
    const w = r.issues.filter((i) => i.severity === 'warning');
    expect(w).toHaveLength(1);
    expect(w[0].column).toBe('temp level');
    expect(w[0].message).toContain('rename it in the file, e.g. to temp_level');
  });

  it('modelNameFor turns a header into a name the model language accepts', () => {
    expect(modelNameFor('temp level')).toBe('temp_level');
    expect(modelNameFor('yield (t/ha)')).toBe('yield_t_ha');
    expect(modelNameFor('2024 rain')).toBe('c_2024_rain');
    expect(modelNameFor('x'.repeat(70))).toHaveLength(64);
    for (const n of ['temp level', 'yield (t/ha)', '2024 rain', '%%', '_1', 'a'.repeat(70)]) expect(isModelName(modelNameFor(n))).toBe(true);
    // The language's own name rule (docs/language.md, "Names"): a letter is required, 64 characters at most.
    expect(isModelName('_1')).toBe(false);
    expect(isModelName('a'.repeat(65))).toBe(false);
    expect(isModelName('temp_level')).toBe(true);
  });

  it('an empty file is an error', () => {
    expect(parseCsv('').issues[0].message).toMatch(/empty/);
    expect(parseCsv('\n\n').table).toBeNull();
  });

  it('an unterminated quote is an error', () => {
    const r = parseCsv('a,b\n1,"open\n2,3\n');
    expect(r.table).toBeNull();
    expect(r.issues.some((i) => i.severity === 'error')).toBe(true);
  });
});

describe('parseCsv: encodings', () => {
  it('drops a UTF-8 byte-order mark from text and from bytes', () => {
    const text = '\ufeffdose,yield\n1,2\n';
    expect(Object.keys(parseCsv(text).table!.columns)).toEqual(['dose', 'yield']);
    const bytes = new Uint8Array([0xef, 0xbb, 0xbf, ...enc('dose,yield\n1,2\n')]);
    expect(Object.keys(parseCsv(bytes).table!.columns)).toEqual(['dose', 'yield']);
  });

  it('decodes UTF-16 little-endian with its byte-order mark', () => {
    const s = 'site,n\nRhône,3\n';
    const u16 = new Uint8Array(2 + 2 * s.length);
    u16[0] = 0xff;
    u16[1] = 0xfe;
    for (let i = 0; i < s.length; i++) {
      u16[2 + 2 * i] = s.charCodeAt(i) & 0xff;
      u16[3 + 2 * i] = s.charCodeAt(i) >> 8;
    }
    expect(decodeBytes(u16)).toBe(s);
    expect(parseCsv(u16).table!.columns.site.levels).toEqual(['Rhône']);
  });

  it('reports bytes that are not UTF-8 (a Latin-1 "ô") with row and column', () => {
    // "Rh\xf4ne" in Latin-1: 0xF4 followed by 'n' is an invalid UTF-8 sequence → U+FFFD.
    const bytes = new Uint8Array([...enc('site,n\nAlder,1\nRh'), 0xf4, ...enc('ne,3\n')]);
    const r = parseCsv(bytes);
    expect(r.table).toBeNull();
    expect(r.issues).toContainEqual({
      severity: 'error',
      row: 2,
      column: 'site',
      message: 'Row 2, column "site" has characters that are not valid UTF-8: save the file as UTF-8.',
    });
  });
});
