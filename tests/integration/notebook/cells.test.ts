import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { notebookWorld, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

describe('cells', () => {
  it('adds cells of each kind with default content, in order', async () => {
    const a = await w.editor.post(`${w.base}/cells`, { kind: 'notes', source: '# Blend' });
    const b = await w.editor.post(`${w.base}/cells`, { kind: 'fit' });
    const c = await w.editor.post(`${w.base}/cells`, { kind: 'model', position: 1, source: 'unknown w[3]' });
    expect([a.status, b.status, c.status]).toEqual([201, 201, 201]);
    expect(b.body.cell.content.settings.chains).toBe(4);
    const nb = await w.viewer.get(w.base);
    expect(nb.body.cells.map((x: { kind: string }) => x.kind)).toEqual(['notes', 'model', 'fit']);
    expect(nb.body.cells.map((x: { position: number }) => x.position)).toEqual([0, 1, 2]);
  });

  it('refuses content that does not fit the kind, naming the field', async () => {
    const res = await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: null, settings: { chains: 99, warmup: 100, draws: 100, seed: 1, sampler: 'auto' } } });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields ?? {}).join(' ')).toMatch(/content\.settings\.chains/);
  });

  it('a stale-version save gets 409 with both texts and loses nothing', async () => {
    const created = await w.editor.post(`${w.base}/cells`, { kind: 'model', source: 'unknown a' });
    const id = created.body.cell.id;
    // The editor saves version 1 → 2.
    const first = await w.editor.patch(`${w.base}/cells/${id}`, { baseVersion: 1, source: 'unknown a\nunknown b' });
    expect(first.status).toBe(200);
    expect(first.body.cell.version).toBe(2);
    // The owner still holds version 1 and saves: refused, with the stored text and theirs.
    const stale = await w.owner.patch(`${w.base}/cells/${id}`, { baseVersion: 1, source: 'unknown z' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('conflict');
    expect(stale.body.conflict.current.source).toBe('unknown a\nunknown b');
    expect(stale.body.conflict.current.version).toBe(2);
    expect(stale.body.conflict.yours).toEqual({ baseVersion: 1, source: 'unknown z' });
    // Nothing was overwritten.
    const nb = await w.owner.get(w.base);
    const stored = nb.body.cells.find((c: { id: string }) => c.id === id);
    expect(stored.source).toBe('unknown a\nunknown b');
    expect(stored.version).toBe(2);
    // Saving on top of the current version succeeds.
    const again = await w.owner.patch(`${w.base}/cells/${id}`, { baseVersion: 2, source: 'unknown z' });
    expect(again.status).toBe(200);
    expect(again.body.cell.version).toBe(3);
  });

  it('two saves from the same base version at once: exactly one wins', async () => {
    const created = await w.editor.post(`${w.base}/cells`, { kind: 'notes', source: 'x' });
    const id = created.body.cell.id;
    const [p, q] = await Promise.all([
      w.editor.patch(`${w.base}/cells/${id}`, { baseVersion: 1, source: 'from editor' }),
      w.owner.patch(`${w.base}/cells/${id}`, { baseVersion: 1, source: 'from owner' }),
    ]);
    expect([p.status, q.status].sort()).toEqual([200, 409]);
  });

  it('moves cells up and down and keeps positions dense', async () => {
    const before = (await w.editor.get(w.base)).body.cells as { id: string }[];
    const last = before[before.length - 1].id;
    const up = await w.editor.post(`${w.base}/cells/${last}/move`, { direction: 'up' });
    expect(up.status).toBe(200);
    const order = up.body.order as { id: string; position: number }[];
    expect(order.map((o) => o.position)).toEqual(order.map((_, i) => i));
    expect(order[order.length - 2].id).toBe(last);
    const top = await w.editor.post(`${w.base}/cells/${last}/move`, { position: 0 });
    expect(top.body.order[0].id).toBe(last);
  });

  it('collapses without changing the version; deletes and closes the gap', async () => {
    const cellsNow = (await w.editor.get(w.base)).body.cells as { id: string; version: number }[];
    const target = cellsNow[1];
    const col = await w.editor.post(`${w.base}/cells/${target.id}/collapse`, { collapsed: true });
    expect(col.status).toBe(200);
    expect(col.body.cell.collapsed).toBe(true);
    expect(col.body.cell.version).toBe(target.version);
    const del = await w.editor.delete(`${w.base}/cells/${target.id}`);
    expect(del.status).toBe(204);
    const after = (await w.editor.get(w.base)).body.cells as { position: number }[];
    expect(after.map((c) => c.position)).toEqual(after.map((_, i) => i));
    expect(after).toHaveLength(cellsNow.length - 1);
  });

  it('viewers and reviewers cannot change cells', async () => {
    const cellsNow = (await w.editor.get(w.base)).body.cells as { id: string; version: number }[];
    const id = cellsNow[0].id;
    expect((await w.viewer.patch(`${w.base}/cells/${id}`, { baseVersion: cellsNow[0].version, source: 'x' })).status).toBe(403);
    expect((await w.reviewer.post(`${w.base}/cells`, { kind: 'notes' })).status).toBe(403);
    expect((await w.outsider.get(w.base)).status).toBe(404);
  });
});
