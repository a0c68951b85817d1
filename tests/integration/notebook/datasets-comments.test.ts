import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { count } from 'drizzle-orm';
import { datasets } from '../../../server/db/schema';
import { DATASET_MAX_BYTES } from '../../../shared/api/notebook';
import { notebookWorld, postFile, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

const storedCount = async () => Number((await w.server.db.db.select({ n: count() }).from(datasets))[0].n);

describe('dataset upload', () => {
  it('stores a good CSV with column types, missing counts and a preview', async () => {
    const csv = 'roast,share,cups\nlight,0.2,12\ndark,0.5,NA\nmedium,0.3,9\n';
    const res = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'blend.csv', text: csv }, { name: 'blend' });
    expect(res.status).toBe(201);
    const d = res.body.dataset;
    expect(d.name).toBe('blend');
    expect(d.rows).toBe(3);
    expect(d.columns.map((c: { type: string }) => c.type)).toEqual(['category', 'numeric', 'integer']);
    expect(d.columns[2].missing).toBe(1);
    expect(res.body.rows[1]).toEqual(['dark', 0.5, null]);
    const again = await w.viewer.get(`/api/workspaces/${w.ws}/datasets/${d.id}`);
    expect(again.status).toBe(200);
    expect(again.body.rows).toHaveLength(3);
  });

  it('refuses a ragged file with a message naming the row, and stores nothing', async () => {
    const before = await storedCount();
    const res = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'bad.csv', text: 'a,b\n1,2\n3\n4,5\n' }, { name: 'bad' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toBe('The file was not stored. Row 2 has 1 cell; the header has 2.');
    expect(await storedCount()).toBe(before);
  });

  it('refuses a file without a header row', async () => {
    const res = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'n.csv', text: '1,2\n3,4\n' }, { name: 'nohead' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/header/);
  });

  it('refuses bytes that are not UTF-8, naming the row and column', async () => {
    const bytes = new Uint8Array([...new TextEncoder().encode('site,label\n1,'), 0xff, 0xfe, 0x41, 0x0a]);
    const res = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'latin.csv', text: bytes }, { name: 'latin' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/UTF-8/);
    expect(res.body.error.message).toMatch(/label/);
  });

  it('refuses a file over the size limit with 413 and stores nothing', async () => {
    const before = await storedCount();
    const big = 'x\n' + '1\n'.repeat(Math.ceil(DATASET_MAX_BYTES / 2) + 10);
    const res = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'big.csv', text: big }, { name: 'big' });
    expect(res.status).toBe(413);
    expect(await storedCount()).toBe(before);
  });

  it('refuses a bad table name and uploads by reviewers', async () => {
    const csv = 'a\n1\n';
    expect((await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'a.csv', text: csv }, { name: '9lives' })).status).toBe(400);
    expect((await postFile(w.reviewer, `/api/workspaces/${w.ws}/datasets`, { name: 'a.csv', text: csv }, { name: 'ok' })).status).toBe(403);
  });
});

describe('comments', () => {
  it('reviewers comment, reply, resolve and reopen; counts follow; viewers read but cannot write', async () => {
    const cell = (await w.editor.post(`${w.base}/cells`, { kind: 'notes', source: 'Roast shares must sum to one.' })).body.cell;
    const c1 = await w.reviewer.post(`${w.base}/cells/${cell.id}/comments`, { body: 'Is the dark roast share plausible?' });
    expect(c1.status).toBe(201);
    expect(c1.body.comment.author.name).toBe('Reviewer');
    const reply = await w.editor.post(`${w.base}/cells/${cell.id}/comments`, { body: 'Yes, from the supplier sheet.', replyTo: c1.body.comment.id });
    expect(reply.status).toBe(201);
    expect(reply.body.comment.replyTo).toBe(c1.body.comment.id);
    let counts = (await w.reviewer.get(`${w.base}/comment-counts`)).body.counts;
    expect(counts[cell.id]).toEqual({ open: 1, total: 2 });
    const resolved = await w.reviewer.patch(`${w.base}/comments/${reply.body.comment.id}`, { resolved: true });
    expect(resolved.status).toBe(200);
    expect(resolved.body.comment.id).toBe(c1.body.comment.id); // resolving a reply resolves its thread
    expect(resolved.body.comment.resolved).toBe(true);
    counts = (await w.reviewer.get(`${w.base}/comment-counts`)).body.counts;
    expect(counts[cell.id]).toEqual({ open: 0, total: 2 });
    const reopened = await w.owner.patch(`${w.base}/comments/${c1.body.comment.id}`, { resolved: false });
    expect(reopened.body.comment.resolved).toBe(false);
    const list = await w.reviewer.get(`${w.base}/comments`);
    expect(list.body.comments.map((c: { body: string }) => c.body)).toEqual(['Is the dark roast share plausible?', 'Yes, from the supplier sheet.']);
    expect((await w.viewer.post(`${w.base}/cells/${cell.id}/comments`, { body: 'hi' })).status).toBe(403);
    // Viewers read the threads, and only read them.
    const seen = await w.viewer.get(`${w.base}/comments`);
    expect(seen.status).toBe(200);
    expect(seen.body.comments).toHaveLength(2);
    expect((await w.viewer.patch(`${w.base}/comments/${c1.body.comment.id}`, { resolved: true })).status).toBe(403);
    expect((await w.reviewer.post(`${w.base}/cells/${cell.id}/comments`, { body: '   ' })).status).toBe(400);
  });
});

describe('notebook file', () => {
  it('exports and imports a notebook with its datasets and re-pointed references', async () => {
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'cups.csv', text: 'cups\n3\n4\n' }, { name: 'cups' });
    await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: up.body.dataset.id } });
    const model = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: 'table cups\nunknown lam\nconstrain lam >= 0' })).body.cell;
    await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings: { chains: 2, warmup: 100, draws: 100, seed: 3, sampler: 'auto' } } });
    const exp = await w.viewer.get(`${w.base}/export`);
    expect(exp.status).toBe(200);
    expect(exp.headers.get('content-disposition')).toMatch(/attachment/);
    expect(exp.body.slackline_notebook).toBe(2);
    const file = exp.body;
    type Block = { ref: string; role: string; text: string; model_ref?: string; table_ref?: string };
    const last = (role: string) => file.blocks.filter((x: Block) => x.role === role).at(-1) as Block;
    expect(file.blocks.map((x: Block) => x.role).slice(-3)).toEqual(['data', 'model', 'fit']);
    expect(last('fit').model_ref).toBe(last('model').ref);
    expect(last('model').text).toBe('table cups\nunknown lam\nconstrain lam >= 0');
    expect(file.tables.find((t: { ref: string }) => t.ref === last('data').table_ref).name).toBe('cups');
    const imp = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, { name: 'nb.json', text: JSON.stringify(file), type: 'application/json' });
    expect(imp.status).toBe(201);
    expect(imp.body.cells).toBe(file.blocks.length);
    expect(imp.body.datasets).toBe(1);
    const copy = await w.editor.get(`/api/workspaces/${w.ws}/notebooks/${imp.body.notebook.id}`);
    const kinds = copy.body.cells.map((c: { kind: string }) => c.kind);
    expect(kinds).toEqual(file.blocks.map((b: { role: string }) => b.role));
    const copyModel = copy.body.cells.find((c: { kind: string }) => c.kind === 'model');
    const copyFit = copy.body.cells.find((c: { kind: string }) => c.kind === 'fit');
    expect(copyFit.content.modelCellId).toBe(copyModel.id);
    const copyData = copy.body.cells.find((c: { kind: string }) => c.kind === 'data');
    expect(copyData.content.datasetId).not.toBe(up.body.dataset.id);
    expect((await w.editor.get(`/api/workspaces/${w.ws}/datasets/${copyData.content.datasetId}`)).body.dataset.name).toBe('cups');
  });

  it('imports a version 1 file', async () => {
    const v1 = {
      slackline: 1,
      notebook: { title: 'Older file' },
      cells: [
        { key: 'c1', kind: 'data', content: { datasetId: 'd1' } },
        { key: 'c2', kind: 'model', source: 'table brew\nunknown lam\nconstrain lam >= 0' },
        { key: 'c3', kind: 'fit', content: { modelCellId: 'c2', settings: { chains: 2, warmup: 100, draws: 100, seed: 3, sampler: 'auto' } } },
      ],
      datasets: [{ key: 'd1', name: 'brew', csv: 'cups\n3\n4\n' }],
    };
    const imp = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, { name: 'old.json', text: JSON.stringify(v1), type: 'application/json' });
    expect(imp.status).toBe(201);
    expect(imp.body.notebook.title).toBe('Older file');
    const copy = await w.editor.get(`/api/workspaces/${w.ws}/notebooks/${imp.body.notebook.id}`);
    expect(copy.body.cells.map((c: { kind: string }) => c.kind)).toEqual(['data', 'model', 'fit']);
    expect(copy.body.cells[2].content.modelCellId).toBe(copy.body.cells[1].id);
    expect((await w.editor.get(`/api/workspaces/${w.ws}/datasets/${copy.body.cells[0].content.datasetId}`)).body.dataset.name).toBe('brew');
  });

  it('refuses a bad file with a clear message and creates nothing', async () => {
    const before = (await w.editor.get(`/api/workspaces/${w.ws}/notebooks`)).body.notebooks.length;
    const notJson = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, { name: 'x.json', text: '{nope', type: 'application/json' });
    expect(notJson.status).toBe(400);
    expect(notJson.body.error.message).toMatch(/not valid JSON/);
    const future = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, { name: 'x.json', text: JSON.stringify({ slackline: 9, notebook: { title: 'x' }, cells: [], datasets: [] }), type: 'application/json' });
    expect(future.status).toBe(400);
    expect(future.body.error.message).toMatch(/newer Slackline/);
    const future2 = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, { name: 'x.json', text: JSON.stringify({ slackline_notebook: 3, title: 'x', blocks: [], tables: [] }), type: 'application/json' });
    expect(future2.status).toBe(400);
    expect(future2.body.error.message).toMatch(/newer Slackline \(format version 3/);
    const dangling = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, {
      name: 'x.json',
      text: JSON.stringify({ slackline_notebook: 2, title: 'x', blocks: [{ ref: 'b1', role: 'fit', model_ref: 'b7', settings: { chains: 2, warmup: 100, draws: 100, seed: 1, sampler: 'auto' } }], tables: [] }),
      type: 'application/json',
    });
    expect(dangling.status).toBe(400);
    expect(dangling.body.error.message).toBe('Not a valid Slackline notebook file: blocks[0].model_ref: No block with ref "b7"');
    expect(dangling.body.error.fields.file).toBe(dangling.body.error.message);
    const badCsv = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, {
      name: 'x.json',
      text: JSON.stringify({ slackline: 1, notebook: { title: 'x' }, cells: [], datasets: [{ key: 'd1', name: 'rag', csv: 'a,b\n1\n' }] }),
      type: 'application/json',
    });
    expect(badCsv.status).toBe(400);
    expect(badCsv.body.error.message).toMatch(/Dataset "rag"/);
    const badCsv2 = await postFile(w.editor, `/api/workspaces/${w.ws}/notebooks/import`, {
      name: 'x.json',
      text: JSON.stringify({ slackline_notebook: 2, title: 'x', blocks: [{ ref: 'b1', role: 'data', table_ref: 't1' }], tables: [{ ref: 't1', name: 'rag', csv: 'a,b\n1\n' }] }),
      type: 'application/json',
    });
    expect(badCsv2.status).toBe(400);
    expect(badCsv2.body.error.message).toMatch(/Dataset "rag"/);
    expect((await w.editor.get(`/api/workspaces/${w.ws}/notebooks`)).body.notebooks.length).toBe(before);
  });
});
