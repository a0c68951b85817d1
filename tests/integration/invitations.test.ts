/** Invitations: mail with a token link, preview, accept (matching e-mail only), revoke, expiry. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApiServer, type TestServer } from '../helpers/server';
import { createWorkspace, signUp, uniqueEmail } from '../helpers/http';
import { countRows } from '../helpers/db';
import { INVITATION_TTL_MS } from '../../server/routes/invitations';

let server: TestServer;
beforeAll(async () => {
  server = await startApiServer();
});
afterAll(() => server.close());

const tokenOf = (link: string) => decodeURIComponent(new URL(link).pathname.split('/invite/')[1]);

async function ownerWithWorkspace(name = 'Coffee blend panel') {
  const owner = server.client();
  const user = await signUp(owner, { name: 'Imani Owner' });
  const ws = await createWorkspace(owner, name);
  return { owner, user, ws };
}

describe('invitations', () => {
  it('invites by e-mail; the invitee signs up with that address, previews and accepts with the role', async () => {
    const { owner, ws } = await ownerWithWorkspace();
    const email = uniqueEmail('Invitee');
    const created = await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'reviewer' });
    expect(created.status).toBe(201);
    expect(created.body.invitation).toMatchObject({ email: email.toLowerCase(), role: 'reviewer' });
    expect(JSON.stringify(created.body)).not.toMatch(/token/i);

    const pending = await owner.get(`/api/workspaces/${ws}/invitations`);
    expect(pending.body.invitations).toHaveLength(1);

    const mail = await server.mail.waitFor(email, { subject: /invited/ });
    // The subject carries no sender-chosen text (the names are in the body).
    expect(mail.subject).toBe('You are invited to a workspace on Slackline');
    expect(mail.text).toContain('"Coffee blend panel"');
    expect(mail.text).toContain('as reviewer');
    const link = server.mail.linkIn(mail, '/invite/');
    expect(link.startsWith(server.url)).toBe(true);
    const token = tokenOf(link);

    const invitee = server.client();
    // Signed out: must sign in first.
    expect((await invitee.post('/api/invitations/accept', { token })).status).toBe(401);
    await signUp(invitee, { email });
    const preview = await invitee.post('/api/invitations/preview', { token });
    expect(preview.status).toBe(200);
    expect(preview.body.invitation).toMatchObject({
      workspaceName: 'Coffee blend panel',
      role: 'reviewer',
      invitedByName: 'Imani Owner',
      emailMatches: true,
    });
    const accepted = await invitee.post('/api/invitations/accept', { token });
    expect(accepted.status).toBe(200);
    expect(accepted.body.workspace).toMatchObject({ id: ws, role: 'reviewer' });
    expect((await invitee.get('/api/workspaces')).body.workspaces[0]).toMatchObject({ id: ws, role: 'reviewer' });

    // Used up, and no longer pending.
    expect((await invitee.post('/api/invitations/accept', { token })).status).toBe(404);
    expect((await owner.get(`/api/workspaces/${ws}/invitations`)).body.invitations).toHaveLength(0);
  });

  it('refuses an account with another e-mail (a forwarded link is not enough)', async () => {
    const { owner, ws } = await ownerWithWorkspace();
    const email = uniqueEmail('intended');
    await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'editor' });
    const token = tokenOf(server.mail.linkIn(await server.mail.waitFor(email, { subject: /invited/ }), '/invite/'));
    const other = server.client();
    await signUp(other);
    const preview = await other.post('/api/invitations/preview', { token });
    expect(preview.body.invitation.emailMatches).toBe(false);
    const res = await other.post('/api/invitations/accept', { token });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('email_mismatch');
    expect((await other.get(`/api/workspaces/${ws}`)).status).toBe(404);
    // The rightful invitee can still accept.
    const right = server.client();
    await signUp(right, { email });
    expect((await right.post('/api/invitations/accept', { token })).status).toBe(200);
  });

  it('revoked and expired invitations cannot be accepted', async () => {
    const { owner, ws } = await ownerWithWorkspace();
    const e1 = uniqueEmail('revoked');
    const inv = await owner.post(`/api/workspaces/${ws}/invitations`, { email: e1, role: 'viewer' });
    const t1 = tokenOf(server.mail.linkIn(await server.mail.waitFor(e1, { subject: /invited/ }), '/invite/'));
    expect((await owner.delete(`/api/workspaces/${ws}/invitations/${inv.body.invitation.id}`)).status).toBe(204);
    const c1 = server.client();
    await signUp(c1, { email: e1 });
    const r1 = await c1.post('/api/invitations/accept', { token: t1 });
    expect(r1.status).toBe(404);
    expect(r1.body.error.code).toBe('invalid_token');

    const e2 = uniqueEmail('late');
    await owner.post(`/api/workspaces/${ws}/invitations`, { email: e2, role: 'viewer' });
    const t2 = tokenOf(server.mail.linkIn(await server.mail.waitFor(e2, { subject: /invited/ }), '/invite/'));
    const c2 = server.client();
    await signUp(c2, { email: e2 });
    server.clock.advance(INVITATION_TTL_MS + 60_000);
    try {
      expect((await c2.post('/api/invitations/accept', { token: t2 })).status).toBe(404);
      expect((await owner.get(`/api/workspaces/${ws}/invitations`)).body.invitations).toHaveLength(0);
    } finally {
      server.clock.advance(-(INVITATION_TTL_MS + 60_000));
    }
    const audit = await owner.get(`/api/workspaces/${ws}/audit`);
    expect(audit.body.entries.map((e: { action: string }) => e.action)).toContain('invitation.revoked');
  });

  it('a new invitation to the same address replaces the pending one; members cannot be invited', async () => {
    const { owner, ws } = await ownerWithWorkspace();
    const email = uniqueEmail('twice');
    await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'viewer' });
    const first = tokenOf(server.mail.linkIn(await server.mail.waitFor(email, { subject: /invited/ }), '/invite/'));
    await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'editor' });
    const all = (await server.mail.all()).filter((m) => m.to.includes(email));
    expect(all).toHaveLength(2);
    const second = tokenOf(server.mail.linkIn(all[0], '/invite/'));
    expect(second).not.toBe(first);
    const pending = (await owner.get(`/api/workspaces/${ws}/invitations`)).body.invitations;
    expect(pending).toHaveLength(1);
    expect(pending[0].role).toBe('editor');

    const c = server.client();
    await signUp(c, { email });
    expect((await c.post('/api/invitations/accept', { token: first })).status).toBe(404);
    expect((await c.post('/api/invitations/accept', { token: second })).body.workspace.role).toBe('editor');

    const again = await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'viewer' });
    expect(again.status).toBe(409);
    expect(again.body.error.fields).toEqual({ email: 'Already a member' });
  });

  it('only owners invite; an invitation cannot grant ownership', async () => {
    const { owner, ws } = await ownerWithWorkspace();
    const asOwnerRole = await owner.post(`/api/workspaces/${ws}/invitations`, { email: uniqueEmail(), role: 'owner' });
    expect(asOwnerRole.status).toBe(400);
    expect(asOwnerRole.body.error.fields.role).toBeTruthy();

    const email = uniqueEmail('editor');
    await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'editor' });
    const ed = server.client();
    await signUp(ed, { email });
    await ed.post('/api/invitations/accept', { token: tokenOf(server.mail.linkIn(await server.mail.waitFor(email, { subject: /invited/ }), '/invite/')) });
    const before = await countRows(server.db.handle, 'invitations');
    expect((await ed.post(`/api/workspaces/${ws}/invitations`, { email: uniqueEmail(), role: 'viewer' })).status).toBe(403);
    expect(await countRows(server.db.handle, 'invitations')).toBe(before);
  });

  it('takes the invitation back when the mail cannot be sent', async () => {
    const broken = await startApiServer();
    try {
      const owner = broken.client();
      await signUp(owner);
      const ws = await createWorkspace(owner);
      // Swap in a mailer whose relay is down: the app must not leave a usable invitation behind.
      const { createSmtpMailer } = await import('../../server/mail/mailer');
      const dead = createSmtpMailer('smtp://127.0.0.1:9', 'x@example.test');
      // A second app on the same database, wired to the dead relay.
      const { createApp } = await import('../../server/app');
      const { pingDb } = await import('../../server/db/client');
      const app2Config = { ...broken.config, logErrors: false };
      const app2 = createApp({ db: broken.db.db, mailer: dead, clock: broken.clock, config: app2Config, pingDb: () => pingDb(broken.db.handle) });
      const s = app2.listen(0, '127.0.0.1');
      await new Promise((r) => s.once('listening', r));
      const url = `http://127.0.0.1:${(s.address() as import('node:net').AddressInfo).port}`;
      // The second app answers as its own address (Host and Origin checks).
      app2Config.publicUrl = url;
      try {
        const res = await fetch(`${url}/api/workspaces/${ws}/invitations`, {
          method: 'POST',
          headers: { 'content-type': 'application/json', origin: url, cookie: owner.cookieHeader },
          body: JSON.stringify({ email: uniqueEmail(), role: 'viewer' }),
        });
        expect(res.status).toBe(503);
        expect((await owner.get(`/api/workspaces/${ws}/invitations`)).body.invitations).toHaveLength(0);
      } finally {
        s.close();
        dead.close();
      }
    } finally {
      await broken.close();
    }
  });
});
