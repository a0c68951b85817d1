import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import {
  checkCellContent,
  createCellBody,
  defaultCellContent,
  describeNotebookFileError,
  moveCellBody,
  notebookFileSchema,
  saveCellBody,
} from '../../../../shared/api/notebook';
import { buildNotebookFile, remapContent } from '../../../../shared/notebook-file';
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

  it('writes keys and re-points references; a round trip through JSON validates', () => {
    expect(file.slackline).toBe(1);
    expect(file.cells.map((c) => c.key)).toEqual(['c1', 'c2', 'c3', 'c4', 'c5', 'c6']);
    expect(file.cells[1].content).toEqual({ datasetId: 'd1' });
    expect(file.cells[3].content).toEqual({ modelCellId: 'c3', settings });
    expect(file.cells[4].content).toEqual({ modelCellId: null, settings }); // the model cell was deleted
    expect(file.cells[5].content).toEqual({ modelCellIds: ['c3'] }); // a notes cell is not a model
    const parsed = notebookFileSchema.safeParse(JSON.parse(JSON.stringify(file)));
    expect(parsed.success).toBe(true);
  });

  it('refuses files from a newer format, unknown kinds, dangling references and duplicates with a readable message', () => {
    const json = JSON.parse(JSON.stringify(file));
    const msg = (v: unknown) => {
      const r = notebookFileSchema.safeParse(v);
      expect(r.success).toBe(false);
      return r.success ? '' : describeNotebookFileError(r.error);
    };
    expect(msg({ ...json, slackline: 2 })).toMatch(/newer Slackline/);
    expect(msg({ notebook: json.notebook, cells: [], datasets: [] })).toMatch(/slackline/);
    expect(msg({ ...json, cells: [{ ...json.cells[0], kind: 'chart' }] })).toMatch(/^Not a valid Slackline notebook file: cells\[0\]/);
    expect(msg({ ...json, cells: [...json.cells.slice(0, 3), { ...json.cells[3], content: { modelCellId: 'c1', settings } }] })).toMatch(/cells\[3\]\.content\.modelCellId: Cell "c1" is a notes cell/);
    expect(msg({ ...json, datasets: [] })).toMatch(/No dataset with key "d1"/);
    expect(msg({ ...json, cells: [json.cells[0], json.cells[0]] })).toMatch(/Duplicate cell key/);
    expect(msg({ ...json, datasets: [{ ...json.datasets[0], name: '1bad name' }] })).toMatch(/datasets\[0\]\.name/);
  });

  it('remapContent on import maps keys to new ids', () => {
    const ids: Record<string, string> = { c3: 'newmodel' };
    expect(remapContent('fit', { modelCellId: 'c3', settings }, (k) => ids[k], () => undefined)).toEqual({ modelCellId: 'newmodel', settings });
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
