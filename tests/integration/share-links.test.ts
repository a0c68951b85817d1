/** Read-only share links: access by token, nothing else, revocation, expiry, audit. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApiServer, type TestServer } from '../helpers/server';
import { createWorkspace, signUp } from '../helpers/http';
import { cells, shareLinks } from '../../server/db/schema';
import { newId } from '../../server/lib/ids';

let server: TestServer;
beforeAll(async () => {
  server = await startApiServer();
});
afterAll(() => server.close());

async function notebookWithCell() {
  const owner = server.client();
  await signUp(owner, { name: 'Nadia' });
  const ws = await createWorkspace(owner, 'River sediment');
  const nb = (await owner.post(`/api/workspaces/${ws}/notebooks`, { title: 'Source shares' })).body.notebook;
  await server.db.db.insert(cells).values({
    id: newId(), workspaceId: ws, notebookId: nb.id, kind: 'notes', position: 0, source: '# Field notes', content: null,
  });
  const other = (await owner.post(`/api/workspaces/${ws}/notebooks`, { title: 'Private draft' })).body.notebook;
  return { owner, ws, nb, other };
}

describe('share links', () => {
  it('lets an anonymous holder read that notebook and nothing else', async () => {
    const { owner, ws, nb, other } = await notebookWithCell();
    const created = await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {});
    expect(created.status).toBe(201);
    const { token, path, link } = created.body;
    expect(path).toBe(`/s/${token}`);
    expect(link).toMatchObject({ notebookId: nb.id, expiresAt: null, revokedAt: null, active: true });
    // Only the hash is stored.
    const rows = await server.db.db.select().from(shareLinks);
    expect(rows.some((r) => r.tokenHash === token)).toBe(false);

    const anon = server.client();
    const shared = await anon.get(`/api/share/${token}`);
    expect(shared.status).toBe(200);
    expect(shared.body.notebook).toMatchObject({ id: nb.id, title: 'Source shares' });
    expect(shared.body.notebook).not.toHaveProperty('workspaceId');
    expect(shared.body.workspaceName).toBe('River sediment');
    expect(shared.body.cells.map((c: { source: string }) => c.source)).toEqual(['# Field notes']);

    // The token is not a key to anything else, wherever it is put.
    anon.extraHeaders = { authorization: `Bearer ${token}`, 'x-share-token': token, cookie: `slackline_session=${token}` };
    expect((await anon.get(`/api/workspaces/${ws}/notebooks/${nb.id}`)).status).toBe(401);
    expect((await anon.get(`/api/workspaces/${ws}/notebooks/${other.id}`)).status).toBe(401);
    expect((await anon.get(`/api/workspaces/${ws}/notebooks`)).status).toBe(401);
    expect((await anon.get('/api/workspaces')).status).toBe(401);
    expect((await anon.patch(`/api/workspaces/${ws}/notebooks/${nb.id}`, { title: 'defaced' })).status).toBe(401);
  });

  it('stops working when revoked, and the revocation is audited', async () => {
    const { owner, ws, nb } = await notebookWithCell();
    const { token, link } = (await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {})).body;
    expect((await server.client().get(`/api/share/${token}`)).status).toBe(200);
    expect((await owner.delete(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links/${link.id}`)).status).toBe(204);
    const gone = await server.client().get(`/api/share/${token}`);
    expect(gone.status).toBe(404);
    expect(gone.body.error.code).toBe('not_found');
    const listed = (await owner.get(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`)).body.links;
    expect(listed[0]).toMatchObject({ id: link.id, active: false });
    expect(listed[0].revokedAt).not.toBeNull();
    // Revoking twice is a 404, not a second audit row.
    expect((await owner.delete(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links/${link.id}`)).status).toBe(404);
    const actions = (await owner.get(`/api/workspaces/${ws}/audit`)).body.entries.map((e: { action: string }) => e.action);
    expect(actions.filter((a: string) => a === 'share_link.created')).toHaveLength(1);
    expect(actions.filter((a: string) => a === 'share_link.revoked')).toHaveLength(1);
  });

  it('expires at its expiry time (injected clock)', async () => {
    const { owner, ws, nb } = await notebookWithCell();
    const expiresAt = new Date(server.clock.now().getTime() + 2 * 3600_000).toISOString();
    const { token } = (await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, { expiresAt })).body;
    expect((await server.client().get(`/api/share/${token}`)).body.expiresAt).toBe(expiresAt);
    server.clock.advance(2 * 3600_000 + 1);
    try {
      expect((await server.client().get(`/api/share/${token}`)).status).toBe(404);
    } finally {
      server.clock.advance(-(2 * 3600_000 + 1));
    }
    const past = await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {
      expiresAt: new Date(server.clock.now().getTime() - 1000).toISOString(),
    });
    expect(past.status).toBe(400);
    expect(past.body.error.fields).toEqual({ expiresAt: 'Must be in the future' });
  });

  it('dies with its notebook; links of one workspace cannot be managed through another', async () => {
    const { owner, ws, nb } = await notebookWithCell();
    const { token, link } = (await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {})).body;
    const ws2 = await createWorkspace(owner, 'Second workspace');
    // Right link id, wrong workspace in the path: not found.
    expect((await owner.delete(`/api/workspaces/${ws2}/notebooks/${nb.id}/share-links/${link.id}`)).status).toBe(404);
    expect((await owner.get(`/api/workspaces/${ws2}/notebooks/${nb.id}`)).status).toBe(404);
    expect((await owner.delete(`/api/workspaces/${ws}/notebooks/${nb.id}`)).status).toBe(204);
    expect((await server.client().get(`/api/share/${token}`)).status).toBe(404);
    const actions = (await owner.get(`/api/workspaces/${ws}/audit`)).body.entries.map((e: { action: string }) => e.action);
    expect(actions).toContain('notebook.deleted');
  });

  it('answers 404 for malformed or invented tokens', async () => {
    expect((await server.client().get('/api/share/short')).status).toBe(404);
    expect((await server.client().get(`/api/share/${'x'.repeat(43)}`)).status).toBe(404);
  });
});
