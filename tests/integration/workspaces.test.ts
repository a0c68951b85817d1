/** Workspaces, members, roles, the last-owner rule and audit rows. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApiServer, type TestServer } from '../helpers/server';
import { type TestClient, createWorkspace, signUp } from '../helpers/http';
import { memberships } from '../../server/db/schema';

let server: TestServer;
beforeAll(async () => {
  server = await startApiServer();
});
afterAll(() => server.close());

/** Add a signed-up user to a workspace through an accepted invitation (the real path). */
async function join(owner: TestClient, workspaceId: string, role: 'editor' | 'reviewer' | 'viewer') {
  const c = server.client();
  const u = await signUp(c);
  const inv = await owner.post(`/api/workspaces/${workspaceId}/invitations`, { email: u.email, role });
  expect(inv.status).toBe(201);
  const mail = await server.mail.waitFor(u.email, { subject: /invited/ });
  const token = server.mail.linkIn(mail, '/invite/').split('/invite/')[1];
  const acc = await c.post('/api/invitations/accept', { token });
  expect(acc.status).toBe(200);
  return { client: c, user: u };
}

describe('workspaces', () => {
  it('creates, lists with role, renames, deletes', async () => {
    const alice = server.client();
    await signUp(alice, { name: 'Alice' });
    const created = await alice.post('/api/workspaces', { name: 'Orchard irrigation trial' });
    expect(created.status).toBe(201);
    expect(created.body.workspace).toMatchObject({ name: 'Orchard irrigation trial', role: 'owner' });
    const id = created.body.workspace.id;

    const list = await alice.get('/api/workspaces');
    expect(list.body.workspaces.map((w: { id: string }) => w.id)).toEqual([id]);

    const renamed = await alice.patch(`/api/workspaces/${id}`, { name: 'Orchard trial 2027' });
    expect(renamed.status).toBe(200);
    expect((await alice.get(`/api/workspaces/${id}`)).body.workspace.name).toBe('Orchard trial 2027');

    // Someone else neither sees it nor can touch it.
    const bob = server.client();
    await signUp(bob);
    expect((await bob.get('/api/workspaces')).body.workspaces).toEqual([]);
    expect((await bob.get(`/api/workspaces/${id}`)).status).toBe(404);
    expect((await bob.patch(`/api/workspaces/${id}`, { name: 'Mine now' })).status).toBe(404);

    const nb = await alice.post(`/api/workspaces/${id}/notebooks`, { title: 'Yield by irrigation level' });
    expect(nb.status).toBe(201);

    expect((await alice.delete(`/api/workspaces/${id}`)).status).toBe(204);
    expect((await alice.get(`/api/workspaces/${id}`)).status).toBe(404);
    expect((await alice.get('/api/workspaces')).body.workspaces).toEqual([]);
    // The audit row of the deletion outlives the workspace.
    const [rows] = await server.db.handle.pool.query('SELECT action FROM audit_log WHERE workspace_id = ?', [id]);
    expect((rows as { action: string }[]).map((r) => r.action)).toEqual(
      expect.arrayContaining(['workspace.renamed', 'workspace.deleted']),
    );
    const [left] = await server.db.handle.pool.query('SELECT COUNT(*) AS n FROM notebooks WHERE workspace_id = ?', [id]);
    expect(Number((left as { n: number }[])[0].n)).toBe(0);
  });
});

describe('members and roles', () => {
  it('lists members, changes roles, removes, and audits each change', async () => {
    const owner = server.client();
    await signUp(owner, { name: 'Olu Owner' });
    const ws = await createWorkspace(owner);
    const ed = await join(owner, ws, 'editor');
    const rv = await join(owner, ws, 'reviewer');

    const members = await ed.client.get(`/api/workspaces/${ws}/members`);
    expect(members.status).toBe(200);
    expect(members.body.members.map((m: { role: string }) => m.role).sort()).toEqual(['editor', 'owner', 'reviewer']);

    // Only owners change roles.
    expect((await ed.client.patch(`/api/workspaces/${ws}/members/${rv.user.id}`, { role: 'editor' })).status).toBe(403);
    const promoted = await owner.patch(`/api/workspaces/${ws}/members/${rv.user.id}`, { role: 'editor' });
    expect(promoted.status).toBe(200);
    expect(promoted.body.member).toMatchObject({ userId: rv.user.id, role: 'editor' });
    // The reviewer-turned-editor now may create notebooks.
    expect((await rv.client.post(`/api/workspaces/${ws}/notebooks`, { title: 'Now I can' })).status).toBe(201);

    expect((await owner.delete(`/api/workspaces/${ws}/members/${rv.user.id}`)).status).toBe(204);
    expect((await rv.client.get(`/api/workspaces/${ws}`)).status).toBe(404);
    expect((await owner.delete(`/api/workspaces/${ws}/members/${rv.user.id}`)).status).toBe(404);

    const audit = await owner.get(`/api/workspaces/${ws}/audit`);
    const actions = audit.body.entries.map((e: { action: string }) => e.action);
    expect(actions).toEqual(expect.arrayContaining(['member.role_changed', 'member.removed', 'member.joined']));
    const change = audit.body.entries.find((e: { action: string }) => e.action === 'member.role_changed');
    expect(change.detail).toEqual({ from: 'reviewer', to: 'editor' });
    expect(change.actor.name).toBe('Olu Owner');
    expect((await ed.client.get(`/api/workspaces/${ws}/audit`)).status).toBe(403);
  });

  it('keeps a last owner: cannot be demoted, removed or leave; can once another owner exists', async () => {
    const owner = server.client();
    const o = await signUp(owner);
    const ws = await createWorkspace(owner);
    const demote = await owner.patch(`/api/workspaces/${ws}/members/${o.id}`, { role: 'editor' });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('last_owner');
    expect((await owner.delete(`/api/workspaces/${ws}/members/${o.id}`)).body.error.code).toBe('last_owner');
    expect((await owner.post(`/api/workspaces/${ws}/leave`)).body.error.code).toBe('last_owner');
    expect((await owner.get(`/api/workspaces/${ws}`)).body.workspace.role).toBe('owner');

    const second = await join(owner, ws, 'editor');
    expect((await owner.patch(`/api/workspaces/${ws}/members/${second.user.id}`, { role: 'owner' })).status).toBe(200);
    // Two owners: either may now step down or leave, but not both.
    expect((await owner.patch(`/api/workspaces/${ws}/members/${o.id}`, { role: 'viewer' })).status).toBe(200);
    expect((await second.client.post(`/api/workspaces/${ws}/leave`)).body.error.code).toBe('last_owner');
    expect((await owner.get(`/api/workspaces/${ws}`)).body.workspace.role).toBe('viewer');
    // The viewer may leave.
    expect((await owner.post(`/api/workspaces/${ws}/leave`)).status).toBe(204);
    expect((await owner.get(`/api/workspaces/${ws}`)).status).toBe(404);
  });

  it('never leaves a workspace without an owner under concurrent demotions', async () => {
    const a = server.client();
    const ua = await signUp(a);
    const ws = await createWorkspace(a);
    const b = await join(a, ws, 'editor');
    await a.patch(`/api/workspaces/${ws}/members/${b.user.id}`, { role: 'owner' });
    // Both owners demote themselves at the same moment: row locks let exactly one through.
    const [r1, r2] = await Promise.all([
      a.patch(`/api/workspaces/${ws}/members/${ua.id}`, { role: 'editor' }),
      b.client.patch(`/api/workspaces/${ws}/members/${b.user.id}`, { role: 'editor' }),
    ]);
    expect([r1.status, r2.status].sort()).toEqual([200, 409]);
    const rows = await server.db.db.select().from(memberships);
    expect(rows.filter((m) => m.workspaceId === ws && m.role === 'owner')).toHaveLength(1);
  });
});
