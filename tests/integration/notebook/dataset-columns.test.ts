/**
 * Tables are parsed once, at upload, and stored as typed columns beside the CSV: later reads (after
 * the cache is emptied, as after a restart) copy those columns and never parse the CSV again; a
 * table stored before typed columns existed is parsed once and its columns are written back.
 * Previews page through the rows. The reference for every row is the CSV itself, read with
 * papaparse (an independent CSV reader from npm).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import Papa from 'papaparse';
import { datasets } from '../../../server/db/schema';
import { tableCache } from '../../../server/notebook/table-cache';
import { tableReads } from '../../../server/notebook/datasets';
import { notebookWorld, postFile, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

// 1 234 rows of invented field plots: a number with missing cells, a whole number, a label.
const lines = ['plot,yield_t,site'];
for (let i = 0; i < 1234; i++) lines.push(`${i + 1},${i % 97 === 0 ? '' : (20 + (i % 89) * 0.25).toFixed(2)},${['north', 'south', 'ridge'][i % 3]}`);
const csv = lines.join('\n') + '\n';
/** The expected preview row of data row r (0-based), from papaparse: numbers, labels, null when empty. */
const reference = (Papa.parse<string[]>(csv.trim()).data.slice(1) as string[][]).map(([p, y, s]) => [Number(p), y === '' ? null : Number(y), s]);

describe('tables stored as typed columns', () => {
  it('pages through the rows of a stored table without parsing its CSV again, for members and share-link visitors', async () => {
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'plots.csv', text: csv }, { name: 'plots' });
    expect(up.status).toBe(201);
    const id = up.body.dataset.id as string;
    const [row] = await w.server.db.db.select().from(datasets).where(eq(datasets.id, id));
    expect(row.tableColumns).not.toBeNull();
    expect(row.content.toString('utf8')).toBe(csv); // the original file is kept as uploaded

    tableCache.clear();
    const before = { ...tableReads };
    const pages = [];
    for (let offset = 0; offset < 1234; offset += 500) {
      const res = await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${id}/rows?offset=${offset}&limit=500`);
      expect(res.status).toBe(200);
      expect(res.body.offset).toBe(offset);
      expect(res.body.total).toBe(1234);
      pages.push(...res.body.rows);
    }
    expect(pages).toEqual(reference);
    // One read of the stored columns (the cache keeps the table after it); no parse of the CSV.
    expect(tableReads.parses).toBe(before.parses);
    expect(tableReads.decodes).toBe(before.decodes + 1);

    // A page past the end is empty; a limit over 500 is refused.
    expect((await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${id}/rows?offset=5000`)).body.rows).toEqual([]);
    expect((await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${id}/rows?limit=501`)).status).toBe(400);

    // Share-link visitors page the same rows, once the table is shown by a data cell.
    await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: id } });
    const token = (await w.owner.post(`${w.base}/share-links`, {})).body.token as string;
    tableCache.clear();
    const anon = w.server.client();
    const shared = await Promise.all(Array.from({ length: 8 }, () => anon.get(`/api/share/${token}/datasets/${id}/rows?offset=1000&limit=300`)));
    for (const s of shared) {
      expect(s.status).toBe(200);
      expect(s.body.rows).toEqual(reference.slice(1000, 1234));
    }
    expect(tableReads.parses).toBe(before.parses);
  });

  it('a table stored before typed columns existed is parsed once, then read from the columns written back', async () => {
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'old.csv', text: csv }, { name: 'old' });
    const id = up.body.dataset.id as string;
    await w.server.db.db.update(datasets).set({ tableColumns: null }).where(eq(datasets.id, id));
    tableCache.clear();
    const before = { ...tableReads };
    const first = await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${id}/rows?offset=100&limit=3`);
    expect(first.body.rows).toEqual(reference.slice(100, 103));
    expect(tableReads.parses).toBe(before.parses + 1);
    const [row] = await w.server.db.db.select({ tableColumns: datasets.tableColumns }).from(datasets).where(eq(datasets.id, id));
    expect(row.tableColumns).not.toBeNull();
    tableCache.clear();
    const again = await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${id}`);
    expect(again.body.rows.slice(0, 500)).toEqual(reference.slice(0, 500));
    expect(tableReads.parses).toBe(before.parses + 1);
  });
});
