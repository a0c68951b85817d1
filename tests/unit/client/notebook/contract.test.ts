import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import {
  checkCellContent,
  createCellBody,
  defaultCellContent,
  moveCellBody,
  saveCellBody,
} from '../../../../shared/api/notebook';
import { buildNotebookFile, readNotebookFile, remapContent } from '../../../../shared/notebook-file';
import { drawsCsvHeader, drawsCsvRows, summaryCsv } from '../../../../shared/export-csv';

const settings = { chains: 2, warmup: 200, draws: 300, seed: 7, sampler: 'auto' as const };

describe('cell contracts', () => {
  it('validates content per kind', () => {
    expect(checkCellContent('fit', { modelCellId: 'abc', settings }).ok).toBe(true);
    const bad = checkCellContent('fit', { modelCellId: 'abc', settings: { ...settings, chains: 99 } });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(Object.keys(bad.fields)).toEqual(['content.settings.chains']);
    expect(checkCellContent('notes', { x: 1 }).ok).toBe(false);
    expect(checkCellContent('data', { datasetId: null }).ok).toBe(true);
  });
  it('new cells start with valid default content', () => {
    for (const k of ['notes', 'data', 'model', 'fit', 'compare'] as const) expect(checkCellContent(k, defaultCellContent(k)).ok).toBe(true);
  });
  it('create refuses content of the wrong shape and unknown fields', () => {
    expect(createCellBody.safeParse({ kind: 'compare', content: { modelCellIds: 'x' } }).success).toBe(false);
    expect(createCellBody.safeParse({ kind: 'notes', source: '# hi', extra: 1 }).success).toBe(false);
    expect(createCellBody.safeParse({ kind: 'model', source: 'unknown a' }).success).toBe(true);
  });
  it('a save needs a base version and something to save', () => {
    expect(saveCellBody.safeParse({ source: 'x' }).success).toBe(false);
    expect(saveCellBody.safeParse({ baseVersion: 3 }).success).toBe(false);
    expect(saveCellBody.safeParse({ baseVersion: 3, source: 'x' }).success).toBe(true);
  });
  it('a move is a direction or a position, not both', () => {
    expect(moveCellBody.safeParse({ direction: 'up' }).success).toBe(true);
    expect(moveCellBody.safeParse({ position: 2 }).success).toBe(true);
    expect(moveCellBody.safeParse({ direction: 'up', position: 2 }).success).toBe(false);
    expect(moveCellBody.safeParse({ direction: 'left' }).success).toBe(false);
  });
});

describe('notebook file', () => {
  const cells = [
    { id: 'n1', kind: 'notes' as const, source: '# Irrigation', content: null, collapsed: false },
    { id: 'd1', kind: 'data' as const, source: '', content: { datasetId: 'ds9' }, collapsed: true },
    { id: 'm1', kind: 'model' as const, source: 'table plots\nunknown a', content: null, collapsed: false },
    { id: 'f1', kind: 'fit' as const, source: '', content: { modelCellId: 'm1', settings }, collapsed: false },
    { id: 'f2', kind: 'fit' as const, source: '', content: { modelCellId: 'gone', settings }, collapsed: false },
    { id: 'k1', kind: 'compare' as const, source: '', content: { modelCellIds: ['m1', 'n1'] }, collapsed: false },
  ];
  const file = buildNotebookFile('Irrigation', cells, [{ id: 'ds9', name: 'plots', csv: 'a,b\n1,2\n' }], new Date('2026-12-01T12:00:00Z'));
  const json = () => JSON.parse(JSON.stringify(file));

  /** The same notebook as version 1 wrote it (the layout export used before version 2). */
  const v1 = {
    slackline: 1,
    notebook: { title: 'Irrigation', exportedAt: '2026-12-01T12:00:00.000Z' },
    cells: [
      { key: 'c1', kind: 'notes', collapsed: false, source: '# Irrigation', content: null },
      { key: 'c2', kind: 'data', collapsed: true, source: '', content: { datasetId: 'd1' } },
      { key: 'c3', kind: 'model', collapsed: false, source: 'table plots\nunknown a', content: null },
      { key: 'c4', kind: 'fit', collapsed: false, source: '', content: { modelCellId: 'c3', settings } },
      { key: 'c5', kind: 'fit', collapsed: false, source: '', content: { modelCellId: null, settings } },
      { key: 'c6', kind: 'compare', collapsed: false, source: '', content: { modelCellIds: ['c3'] } },
    ],
    datasets: [{ key: 'd1', name: 'plots', csv: 'a,b\n1,2\n' }],
  };

  const refused = (v: unknown) => {
    const r = readNotebookFile(v);
    expect(r.ok).toBe(false);
    return r.ok ? '' : r.message;
  };

  it('export writes version 2: blocks with refs, roles and text, tables, references re-pointed', () => {
    expect(file.slackline_notebook).toBe(2);
    expect(file.title).toBe('Irrigation');
    expect(file.saved_at).toBe('2026-12-01T12:00:00.000Z');
    expect(file.blocks.map((b) => [b.ref, b.role])).toEqual([['b1', 'notes'], ['b2', 'data'], ['b3', 'model'], ['b4', 'fit'], ['b5', 'fit'], ['b6', 'compare']]);
    expect(file.blocks[0]).toEqual({ ref: 'b1', role: 'notes', folded: false, text: '# Irrigation' });
    expect(file.blocks[1]).toEqual({ ref: 'b2', role: 'data', folded: true, text: '', table_ref: 't1' });
    expect(file.blocks[3]).toEqual({ ref: 'b4', role: 'fit', folded: false, text: '', model_ref: 'b3', settings });
    expect(file.blocks[4]).toMatchObject({ model_ref: null }); // the model cell was deleted
    expect(file.blocks[5]).toMatchObject({ model_refs: ['b3'] }); // a notes cell is not a model
    expect(file.tables).toEqual([{ ref: 't1', name: 'plots', csv: 'a,b\n1,2\n' }]);
    expect(Object.keys(json())).toEqual(['slackline_notebook', 'title', 'saved_at', 'blocks', 'tables']);
  });

  it('import reads version 2 after a round trip through JSON', () => {
    const r = readNotebookFile(json());
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.file.version).toBe(2);
    expect(r.file.title).toBe('Irrigation');
    expect(r.file.cells.map((c) => [c.key, c.kind, c.collapsed])).toEqual([
      ['b1', 'notes', false], ['b2', 'data', true], ['b3', 'model', false], ['b4', 'fit', false], ['b5', 'fit', false], ['b6', 'compare', false],
    ]);
    expect(r.file.cells.map((c) => c.content)).toEqual([
      null, { datasetId: 't1' }, null, { modelCellId: 'b3', settings }, { modelCellId: null, settings },
      // A compare cell carries its tests, reference, prior odds, replicates and seed (defaults here).
      { modelCellIds: ['b3'], hypotheses: [], reference: null, priorOdds: [], replicates: 4, seed: 20261201 },
    ]);
    expect(r.file.cells[2].source).toBe('table plots\nunknown a');
    expect(r.file.datasets).toEqual([{ key: 't1', name: 'plots', csv: 'a,b\n1,2\n' }]);
  });

  it('a compare block keeps its tested lines, reference and prior odds through export and import', () => {
    const cells = [
      { id: 'm1', kind: 'model' as const, source: 'unknown a, b\nconstrain a <= b', content: null, collapsed: false },
      {
        id: 'x1', kind: 'compare' as const, source: '', collapsed: false,
        content: { modelCellIds: ['m1'], hypotheses: [{ modelCellId: 'm1', lines: [2] }], reference: { modelCellId: 'm1', without: [2] }, priorOdds: [{ key: { modelCellId: 'm1', without: [] }, odds: 2 }], replicates: 6, seed: 5 },
      },
    ];
    const f = buildNotebookFile('Tests', cells, [], new Date('2026-12-01T12:00:00Z'));
    expect(f.blocks[1]).toMatchObject({ model_refs: ['b1'], tests: [{ model_ref: 'b1', lines: [2] }], reference: { model_ref: 'b1', without_lines: [2] }, prior_odds: [{ model_ref: 'b1', without_lines: [], odds: 2 }], replicates: 6, seed: 5 });
    const back = readNotebookFile(JSON.parse(JSON.stringify(f)));
    expect(back.ok).toBe(true);
    if (!back.ok) return;
    const ids: Record<string, string> = { b1: 'newmodel' };
    expect(remapContent('compare', back.file.cells[1].content, (k) => ids[k], () => undefined)).toEqual({
      modelCellIds: ['newmodel'], hypotheses: [{ modelCellId: 'newmodel', lines: [2] }], reference: { modelCellId: 'newmodel', without: [2] },
      priorOdds: [{ key: { modelCellId: 'newmodel', without: [] }, odds: 2 }], replicates: 6, seed: 5,
    });
    // A test naming a block that is not a model is refused.
    const bad = JSON.parse(JSON.stringify(f));
    bad.blocks[1].tests[0].model_ref = 'b2';
    expect(readNotebookFile(bad).ok).toBe(false);
  });

  it('import still reads version 1, to the same contents up to the file-local keys', () => {
    const r1 = readNotebookFile(JSON.parse(JSON.stringify(v1)));
    const r2 = readNotebookFile(json());
    expect(r1.ok && r2.ok).toBe(true);
    if (!r1.ok || !r2.ok) return;
    expect(r1.file.version).toBe(1);
    const rename: Record<string, string> = { c1: 'b1', c2: 'b2', c3: 'b3', c4: 'b4', c5: 'b5', c6: 'b6', d1: 't1' };
    const renamed = r1.file.cells.map((c) => ({
      ...c,
      key: rename[c.key],
      content: remapContent(c.kind, c.content, (k) => rename[k], (k) => rename[k]),
    }));
    expect(renamed).toEqual(r2.file.cells);
    expect(r1.file.datasets.map((d) => ({ ...d, key: rename[d.key] }))).toEqual(r2.file.datasets);
    // A version 1 file is still checked whole.
    expect(refused({ ...v1, datasets: [] })).toMatch(/No dataset with key "d1"/);
  });

  it('refuses what is not a notebook file, or a newer one, with one sentence', () => {
    expect(refused('a string')).toBe('Not a Slackline notebook file (no "slackline_notebook" version field)');
    expect(refused([json()])).toMatch(/^Not a Slackline notebook file/);
    expect(refused({ title: 'x', blocks: [], tables: [] })).toMatch(/no "slackline_notebook" version field/);
    expect(refused({ ...json(), slackline_notebook: 3 })).toMatch(/newer Slackline \(format version 3; this one reads versions 1 to 2\)/);
    expect(refused({ ...json(), slackline_notebook: '2' })).toMatch(/slackline_notebook: expected the format version 2/);
    expect(refused({ ...v1, slackline: 9 })).toMatch(/newer Slackline \(format version 9; this one reads versions 1 to 2\)/);
    expect(refused({ ...v1, slackline: 0 })).toMatch(/^Not a valid Slackline notebook file: slackline/);
  });

  it('refuses malformed version 2 files, naming the place', () => {
    const j = json();
    expect(refused({ ...j, blocks: [{ ...j.blocks[0], role: 'chart' }] })).toMatch(/^Not a valid Slackline notebook file: blocks\[0\]/);
    expect(refused({ ...j, blocks: [...j.blocks.slice(0, 3), { ...j.blocks[3], model_ref: 'b1' }] })).toMatch(/blocks\[3\]\.model_ref: Block "b1" is a notes block, not a model block/);
    expect(refused({ ...j, blocks: [...j.blocks.slice(0, 5), { ...j.blocks[5], model_refs: ['b9'] }] })).toMatch(/blocks\[5\]\.model_refs\[0\]: No block with ref "b9"/);
    expect(refused({ ...j, tables: [] })).toMatch(/blocks\[1\]\.table_ref: No table with ref "t1"/);
    expect(refused({ ...j, blocks: [j.blocks[0], j.blocks[0]] })).toMatch(/blocks\[1\]\.ref: Duplicate block ref "b1"/);
    expect(refused({ ...j, tables: [{ ...j.tables[0], name: '1bad name' }] })).toMatch(/tables\[0\]\.name/);
    expect(refused({ ...j, tables: [j.tables[0], { ...j.tables[0], ref: 't2' }] })).toMatch(/Duplicate table name "plots"/);
    expect(refused({ ...j, title: '   ' })).toMatch(/title: Required/);
    expect(refused({ ...j, blocks: [{ ...j.blocks[0], ref: 'b 1' }] })).toMatch(/blocks\[0\]\.ref: Refs use letters, digits, _ and -/);
    expect(refused({ ...j, blocks: [{ ...j.blocks[2], text: undefined }] })).toMatch(/blocks\[0\]\.text/);
    expect(refused({ ...j, blocks: [{ ...j.blocks[3], settings: { ...settings, chains: 99 } }] })).toMatch(/blocks\[0\]\.settings\.chains/);
    // Version 1 names inside a version 2 file are unknown fields.
    expect(refused({ ...j, cells: [] })).toMatch(/^Not a valid Slackline notebook file: file: .*"cells"/);
  });

  it('remapContent on import maps keys to new ids', () => {
    const ids: Record<string, string> = { b3: 'newmodel' };
    expect(remapContent('fit', { modelCellId: 'b3', settings }, (k) => ids[k], () => undefined)).toEqual({ modelCellId: 'newmodel', settings });
  });
});

describe('CSV exports', () => {
  it('draws CSV has chain, iteration and one column per quantity, quoted where needed', () => {
    const header = drawsCsvHeader(['w[1]', 'w[2]', 'odd,name']);
    const rows = [...drawsCsvRows(2, new Float64Array([0.1, 0.9, 0.25, 0.75]), 2, new Float64Array([1, 2]), 1)];
    const parsed = Papa.parse<string[]>([header, ...rows].join('\n')).data;
    expect(parsed[0]).toEqual(['chain', 'iteration', 'w[1]', 'w[2]', 'odd,name']);
    expect(parsed[1]).toEqual(['2', '1', '0.1', '0.9', '1']);
    expect(parsed[2]).toEqual(['2', '2', '0.25', '0.75', '2']);
  });
  it('numbers read back to the same double', () => {
    const x = 0.1 + 0.2;
    const [row] = [...drawsCsvRows(1, new Float64Array([x]), 1, new Float64Array(0), 0)];
    expect(Number(row.split(',')[2])).toBe(x);
  });
  it('summary CSV has one row per quantity, estimate and interval first, then mixing and precision', () => {
    const csv = summaryCsv([
      { name: 'mu[1]', kind: 'unknown', mean: 1.1, sd: 2, q5: -0.5, q50: 1, q95: 2.5, rhat: 1.001, essBulk: 900, essTail: 800, mcseMean: 0.01, mcseQ5: 0.03, mcseQ50: 0.015, mcseQ95: 0.02 },
      { name: 'gain, net', kind: 'derived', mean: 3, sd: 0, q5: 3, q50: 3, q95: 3, rhat: 1, essBulk: 400, essTail: 400, mcseMean: 0, mcseQ5: 0, mcseQ50: 0, mcseQ95: 0 },
    ]);
    const parsed = Papa.parse<string[]>(csv.trim()).data;
    expect(parsed).toHaveLength(3);
    expect(parsed[0]).toEqual([
      'quantity', 'origin', 'median', 'interval90_low', 'interval90_high', 'posterior_mean', 'posterior_sd',
      'mixing_rhat', 'effective_draws_centre', 'effective_draws_tails',
      'mc_error_median', 'mc_error_interval90_low', 'mc_error_interval90_high', 'mc_error_mean',
    ]);
    expect(parsed[1]).toEqual(['mu[1]', 'unknown', '1', '-0.5', '2.5', '1.1', '2', '1.001', '900', '800', '0.015', '0.03', '0.02', '0.01']);
    expect(parsed[2].slice(0, 3)).toEqual(['gain, net', 'derived', '3']);
  });
});
