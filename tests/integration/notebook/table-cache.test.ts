/**
 * Tables parsed once: a stored CSV is parsed at upload and then served from the table cache to
 * previews, share-link readers, model checks and fits; concurrent readers of a table that is not
 * cached share one load (of its stored typed columns: see dataset-columns.test.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { tableCache } from '../../../server/notebook/table-cache';
import { notebookWorld, postFile, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

describe('parsed tables are cached by dataset id and version', () => {
  it('share-link reads and model checks of a big table do not parse it again', async () => {
    // 120,000 rows of invented plot yields: a table big enough that a parse is noticeable.
    const lines = ['plot,yield_t'];
    for (let i = 0; i < 120_000; i++) lines.push(`${i + 1},${(20 + (i % 89) * 0.25).toFixed(2)}`);
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'plots.csv', text: lines.join('\n') }, { name: 'plots' });
    expect(up.status).toBe(201);
    const id = up.body.dataset.id as string;
    await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: id } });
    const token = (await w.owner.post(`${w.base}/share-links`, {})).body.token as string;

    // With the cache emptied (as after a restart), eight concurrent share-link reads share one
    // parse; eight more parse nothing.
    tableCache.clear();
    const anon = w.server.client();
    const first = await Promise.all(Array.from({ length: 8 }, () => anon.get(`/api/share/${token}/datasets/${id}`)));
    expect(first.every((r) => r.status === 200)).toBe(true);
    expect(tableCache.stats().loads).toBe(1);
    const again = await Promise.all(Array.from({ length: 8 }, () => anon.get(`/api/share/${token}/datasets/${id}`)));
    expect(again.every((r) => r.status === 200)).toBe(true);
    expect(again[0].body.rows[0]).toEqual([1, 20]);
    expect(again[0].body.rows[1]).toEqual([2, 20.25]);
    expect(tableCache.stats().loads).toBe(1);
    expect(tableCache.stats().hits).toBeGreaterThanOrEqual(8);

    // A model check over the same table uses the cached parse too.
    const check = await w.editor.post(`/api/workspaces/${w.ws}/compile`, {
      source: 'table plots\nunknown mu, sigma\nterm ld_normal(yield_t, mu, sigma)\nconstrain sigma >= 0.01\n',
      notebookId: w.nb,
      region: true,
    });
    expect(check.status).toBe(200);
    expect(check.body.ok).toBe(true);
    expect(tableCache.stats().loads).toBe(1);
  });

  it('a new upload is parsed once, at upload, and its preview comes from the cache', async () => {
    tableCache.clear();
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'small.csv', text: 'a,b\n1,x\n2,y\n' }, { name: 'small' });
    expect(up.status).toBe(201);
    const got = await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${up.body.dataset.id}`);
    expect(got.body.rows).toEqual([
      [1, 'x'],
      [2, 'y'],
    ]);
    expect(tableCache.stats()).toMatchObject({ loads: 0, hits: 1, tables: 1 });
  });
});
