/** The demo seed creates its rows once; running it again changes nothing; the demo can sign in. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApiServer, type TestServer } from '../helpers/server';
import { countRows } from '../helpers/db';
import { DEMO_NOTEBOOK, DEMO_USER, DEMO_WORKSPACE, seedDemo } from '../../server/seed/demo';

let server: TestServer;
beforeAll(async () => {
  server = await startApiServer();
});
afterAll(() => server.close());

describe('demo seed', () => {
  it('is idempotent and gives a working demo account with a notebook', async () => {
    const first = await seedDemo(server.db.db);
    expect(first.created).toEqual(['user', 'workspace', 'notebook', 'notes cell']);
    const tables = ['users', 'workspaces', 'memberships', 'notebooks', 'cells'];
    const before = await Promise.all(tables.map((t) => countRows(server.db.handle, t)));
    const second = await seedDemo(server.db.db);
    expect(second.created).toEqual([]);
    expect(second).toMatchObject({ userId: first.userId, workspaceId: first.workspaceId, notebookId: first.notebookId });
    expect(await Promise.all(tables.map((t) => countRows(server.db.handle, t)))).toEqual(before);

    const c = server.client();
    expect((await c.post('/api/auth/sign-in', { email: DEMO_USER.email, password: DEMO_USER.password })).status).toBe(200);
    const list = (await c.get('/api/workspaces')).body.workspaces;
    expect(list).toEqual([expect.objectContaining({ name: DEMO_WORKSPACE, role: 'owner' })]);
    const nb = (await c.get(`/api/workspaces/${list[0].id}/notebooks`)).body.notebooks;
    expect(nb.map((n: { title: string }) => n.title)).toEqual([DEMO_NOTEBOOK]);
    const detail = await c.get(`/api/workspaces/${list[0].id}/notebooks/${nb[0].id}`);
    expect(detail.body.cells).toHaveLength(1);
    expect(detail.body.cells[0]).toMatchObject({ kind: 'notes', position: 0, version: 1 });
    expect(detail.body.cells[0].source).toContain('simplex');
  });
});
