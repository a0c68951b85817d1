/**
 * The notebook screen's one read: every part equals what the single calls answer (notebook, table
 * summary, model check, a fit cell's runs with the finished run's summary, comments), no part holds
 * a whole table, and outsiders are refused like for the notebook itself.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunWorker } from '../../../server/runs/worker';
import { DATASET_PREVIEW_ROWS } from '../../../shared/api/notebook';
import { notebookWorld, postFile, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

describe('GET …/notebooks/:id/page', () => {
  it('answers the cells, table summaries, model checks, runs and comments the single calls answer', async () => {
    // Invented data: 600 mornings of cups brewed at a tasting bar (more rows than a preview shows).
    const csv = 'cups\n' + Array.from({ length: 600 }, (_, i) => String(2 + ((i * 7) % 6))).join('\n') + '\n';
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'cups.csv', text: csv }, { name: 'tasting' });
    expect(up.status).toBe(201);
    await w.editor.post(`${w.base}/cells`, { kind: 'notes', source: '# Brewing' });
    await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: up.body.dataset.id } });
    const source = 'table tasting\nunknown rate\nterm ld_poisson(cups, rate) + ld_gamma(rate, 2, 0.5)\nconstrain rate >= 1\nconstrain rate <= 20\n';
    const model = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source })).body.cell;
    const settings = { chains: 2, warmup: 100, draws: 100, seed: 3, sampler: 'auto' };
    const fit = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings } })).body.cell;
    expect((await w.editor.post(`${w.base}/cells/${fit.id}/runs`, {})).status).toBe(201);
    // A second table and a second fit cell that has not run: each part lists them in cell order.
    const up2 = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'beans.csv', text: 'grams\n18\n19\n17\n' }, { name: 'beans' });
    expect(up2.status).toBe(201);
    await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: up2.body.dataset.id } });
    const fit2 = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings } })).body.cell;
    const worker = new RunWorker({ db: w.server.db.db, parallel: false, log: () => {} });
    while (await worker.runOnce()) {
      /* the fit's chains and summary */
    }
    expect((await w.reviewer.post(`${w.base}/cells/${model.id}/comments`, { body: 'Why a gamma(2, 0.5) belief?' })).status).toBe(201);

    const page = await w.viewer.get(`${w.base}/page`);
    expect(page.status).toBe(200);
    const b = page.body;
    expect(b.detail).toEqual((await w.viewer.get(w.base)).body);
    expect(b.datasets).toEqual([
      (await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${up.body.dataset.id}`)).body,
      (await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${up2.body.dataset.id}`)).body,
    ]);
    // A summary, not the table: the preview rows only.
    expect(b.datasets[0].dataset.rows).toBe(600);
    expect(b.datasets[0].rows.length).toBe(DATASET_PREVIEW_ROWS);
    const check = (await w.viewer.post(`/api/workspaces/${w.ws}/compile`, { source, notebookId: w.nb, region: true })).body;
    expect(b.modelChecks).toEqual([{ cellId: model.id, source, check }]);
    const runs = (await w.viewer.get(`${w.base}/cells/${fit.id}/runs`)).body.runs;
    expect(b.cellRuns).toEqual([
      { cellId: fit.id, runs },
      { cellId: fit2.id, runs: (await w.viewer.get(`${w.base}/cells/${fit2.id}/runs`)).body.runs },
    ]);
    expect(b.cellRuns[1].runs).toEqual([]);
    expect(b.cellRuns[0].runs[0].status).toBe('done');
    expect(b.cellRuns[0].runs[0].summary.quantities[0].name).toBe('rate');
    expect(b.comments).toEqual((await w.viewer.get(`${w.base}/comments`)).body.comments);

    expect((await w.outsider.get(`${w.base}/page`)).status).toBe(404);
  });
});
