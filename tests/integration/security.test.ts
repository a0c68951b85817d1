/**
 * Security regressions, each played as an attacker would against a running server:
 *  1. account takeover through the captured mail (reset link read at /api/dev/mail);
 *  2. a forged Host (DNS rebinding) and `Origin: null`;
 *  4. share links that outlive their creator's rights;
 *  5. account enumeration (reset mail sent before answering; sign-up telling a registered address
 *     from a new one, or signing in before the address is confirmed);
 *  6. limits per account and per workspace;
 *  7. control characters in names, weak passwords, NUL bytes and reserved column names in CSVs,
 *     the workspace id in share-link dataset answers;
 *  8. pages served from a checkout under a dot folder.
 * (3, notes covering the share view, is a browser test: tests/e2e/notes-takeover.test.ts.)
 */
import { cp, mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { auditLog, pendingSignUps, shareLinks, users } from '../../server/db/schema';
import type { Mailer, OutgoingMail } from '../../server/mail/mailer';
import { afterResponseSettled } from '../../server/http/after-response';
import { REPO_ROOT, startApiServer, startTestServer, type TestServer } from '../helpers/server';
import { CONFIRM_SUBJECT, TEST_PASSWORD, TestClient, confirmationToken, createWorkspace, signUp, uniqueEmail } from '../helpers/http';
import { rawRequest } from '../helpers/net';
import { csvForm } from './notebook/matrix-world';

let server: TestServer;
beforeAll(async () => {
  server = await startApiServer();
});
afterAll(() => server.close());

async function resetLinkFor(email: string) {
  const mail = await server.mail.waitFor(email, { subject: /reset/i });
  return new URL(server.mail.linkIn(mail, '/reset-password')).searchParams.get('token')!;
}

describe('1. captured mail needs the per-start key', () => {
  it('an anonymous attacker cannot read a victim\'s reset mail; the key holder can', async () => {
    const victim = await signUp(server.client(), { name: 'Victim' });
    const attacker = server.client(); // no session
    expect((await attacker.post('/api/auth/password-reset/request', { email: victim.email })).status).toBe(202);
    await server.mail.waitFor(victim.email, { subject: /reset/i }); // the mail exists (read from the database directly)

    const peek = await attacker.get(`/api/dev/mail?to=${encodeURIComponent(victim.email)}`);
    expect(peek.status).toBe(403);
    expect(peek.text).not.toContain('/reset-password');
    // A made-up key is refused too, and sets no cookie.
    const guess = await attacker.get(`/api/dev/mail?key=${'x'.repeat(32)}`);
    expect(guess.status).toBe(403);
    expect(guess.headers.getSetCookie()).toEqual([]);
    // Another account, signed in without the key, sees only its own mail.
    const other = server.client();
    await signUp(other);
    const own = await other.get(`/api/dev/mail?to=${encodeURIComponent(victim.email)}`);
    expect(own.status).toBe(200);
    expect(own.body.messages).toEqual([]);
    expect(own.body.scope).toBe('own');

    // The key, once, then its HttpOnly cookie.
    const dev = server.client();
    const first = await dev.get(`/api/dev/mail?key=${server.config.devMailKey}&to=${encodeURIComponent(victim.email)}`);
    expect(first.status).toBe(200);
    expect(first.body.scope).toBe('all');
    expect(first.body.messages[0].text).toContain('/reset-password');
    expect(first.headers.getSetCookie().join('\n')).toMatch(/slackline_devmail=[^;]+;.*HttpOnly/i);
    const again = await dev.get(`/api/dev/mail?to=${encodeURIComponent(victim.email)}`);
    expect(again.status).toBe(200);
    // The reset mail and, before it, the confirmation of the victim's own sign-up.
    expect(again.body.messages.map((m: { subject: string }) => m.subject)).toEqual([
      'Reset your Slackline password',
      expect.stringMatching(CONFIRM_SUBJECT),
    ]);
  });

  it('the page link trades the key for the cookie and drops it from the address', async () => {
    const dev = new TestClient(server.url);
    const res = await dev.get(`/dev/mail?key=${server.config.devMailKey}`);
    expect(res.status).toBe(303);
    expect(res.headers.get('location')).toBe('/dev/mail');
    expect(res.headers.getSetCookie().join('\n')).toMatch(/SameSite=Strict/i);
    expect((await dev.get('/api/dev/mail')).body.scope).toBe('all');
  });
});

describe('2. Host and Origin', () => {
  it('refuses a forged Host even with a matching Origin', async () => {
    const res = await rawRequest(`${server.url}/api/auth/sign-up`, {
      method: 'POST',
      headers: { host: 'evil.example:3999', origin: 'http://evil.example:3999', 'content-type': 'application/json' },
      body: JSON.stringify({ email: uniqueEmail('rebind'), password: TEST_PASSWORD, name: 'Rebinder' }),
    });
    expect(res.status).toBe(421);
    // Reads too: a rebound page must not read the captured mail or any page.
    expect((await rawRequest(`${server.url}/api/dev/mail`, { headers: { host: 'evil.example:3999' } })).status).toBe(421);
  });

  it('refuses Origin: null and an Origin that only matches the Host header', async () => {
    const body = { email: uniqueEmail('nullorigin'), password: TEST_PASSWORD, name: 'Sandboxed' };
    const sandboxed = new TestClient(server.url, 'null');
    expect((await sandboxed.post('/api/auth/sign-up', body)).status).toBe(403);
    // Origin null with a same-site Referer: the Origin decides.
    const withReferer = await sandboxed.raw('/api/auth/sign-up', {
      method: 'POST',
      headers: { 'content-type': 'application/json', referer: `${server.url}/sign-up` },
      body: JSON.stringify(body),
    });
    expect(withReferer.status).toBe(403);
    // Only the Referer (no Origin header) from our own pages still works.
    const refererOnly = new TestClient(server.url, null);
    const ok = await refererOnly.raw('/api/auth/sign-up', {
      method: 'POST',
      headers: { 'content-type': 'application/json', referer: `${server.url}/sign-up` },
      body: JSON.stringify(body),
    });
    expect(ok.status).toBe(202);
  });
});

describe('4. share links follow their creator\'s rights', () => {
  async function setup() {
    const owner = server.client();
    await signUp(owner, { name: 'Owner' });
    const ws = await createWorkspace(owner, 'Links workspace');
    const nb = (await owner.post(`/api/workspaces/${ws}/notebooks`, { title: 'Shared notebook' })).body.notebook;
    const editor = server.client();
    const ed = await signUp(editor, { name: 'Editor' });
    await owner.post(`/api/workspaces/${ws}/invitations`, { email: ed.email, role: 'editor' });
    const token = new URL(server.mail.linkIn(await server.mail.waitFor(ed.email, { subject: /invited/ }), '/invite/')).pathname.split('/').pop()!;
    expect((await editor.post('/api/invitations/accept', { token })).status).toBe(200);
    const created = await editor.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {});
    expect(created.status).toBe(201);
    const ownLink = (await owner.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {})).body;
    return { owner, editor, ed, ws, nb, link: created.body, ownLink };
  }

  it('revokes an editor\'s links when demoted to viewer, with an audit row; the owner\'s stay', async () => {
    const { owner, ed, ws, link, ownLink } = await setup();
    const anon = server.client();
    expect((await anon.get(`/api/share/${link.token}`)).status).toBe(200);
    // Editor → reviewer → viewer: the first step below editor revokes.
    expect((await owner.patch(`/api/workspaces/${ws}/members/${ed.id}`, { role: 'viewer' })).status).toBe(200);
    expect((await anon.get(`/api/share/${link.token}`)).status).toBe(404);
    expect((await anon.get(`/api/share/${ownLink.token}`)).status).toBe(200);
    const rows = await server.db.db
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.workspaceId, ws), eq(auditLog.action, 'share_link.revoked')));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({ targetId: link.link.id, actorId: expect.any(String) });
    expect(rows[0].detail).toMatchObject({ reason: 'creator_demoted', creatorId: ed.id });
  });

  it('revokes a member\'s links when removed, and when they leave', async () => {
    const a = await setup();
    expect((await a.owner.delete(`/api/workspaces/${a.ws}/members/${a.ed.id}`)).status).toBe(204);
    expect((await server.client().get(`/api/share/${a.link.token}`)).status).toBe(404);

    const b = await setup();
    expect((await b.editor.post(`/api/workspaces/${b.ws}/leave`, {})).status).toBe(204);
    expect((await server.client().get(`/api/share/${b.link.token}`)).status).toBe(404);
    const [row] = await server.db.db.select().from(shareLinks).where(eq(shareLinks.id, b.link.link.id));
    expect(row.revokedAt).not.toBeNull();
  });

  it('keeps an owner\'s links when the owner becomes an editor', async () => {
    const { owner, editor, ed, ws, ownLink } = await setup();
    // Make the editor an owner so the first owner can step down.
    await owner.patch(`/api/workspaces/${ws}/members/${ed.id}`, { role: 'owner' });
    const me = (await owner.get('/api/auth/me')).body.user;
    expect((await editor.patch(`/api/workspaces/${ws}/members/${me.id}`, { role: 'editor' })).status).toBe(200);
    expect((await server.client().get(`/api/share/${ownLink.token}`)).status).toBe(200);
  });

  it('lists every link of the workspace, with notebook and creator, to owners only', async () => {
    const { owner, editor, ws, link, ownLink } = await setup();
    const list = await owner.get(`/api/workspaces/${ws}/share-links`);
    expect(list.status).toBe(200);
    const byId = new Map(list.body.links.map((l: { id: string }) => [l.id, l]));
    expect(byId.get(link.link.id)).toMatchObject({ notebookTitle: 'Shared notebook', createdBy: { name: 'Editor' }, active: true });
    expect(byId.get(ownLink.link.id)).toMatchObject({ createdBy: { name: 'Owner' } });
    expect((await editor.get(`/api/workspaces/${ws}/share-links`)).status).toBe(403);
  });
});

describe('5. no account enumeration', () => {
  it('answers a reset request before any mail is sent (known and unknown addresses alike)', async () => {
    // A mailer spy records, when the app hands it a message, whether the HTTP answer to the
    // request that caused it had already been written out. No timing is measured.
    // Requests are tagged with the address they ask about, so each mail finds its own request.
    const finished = new Set<string>();
    const record: { mail: OutgoingMail; answered: boolean }[] = [];
    const spy = (inner: Mailer): Mailer => ({
      async send(mail) {
        record.push({ mail, answered: finished.has(mail.to) });
        await inner.send(mail);
      },
      close: () => inner.close(),
    });
    const s = await startApiServer({ wrapMailer: spy });
    try {
      s.http.on('request', (req, res) => {
        const id = String(req.headers['x-test-request'] ?? '');
        res.once('finish', () => finished.add(id));
      });
      const known = await signUp(s.client());
      record.length = 0; // the confirmation of that sign-up
      for (const email of [known.email, uniqueEmail('nobody')]) {
        const c = s.client();
        c.extraHeaders = { 'x-test-request': email };
        const res = await c.post('/api/auth/password-reset/request', { email });
        expect(res.status).toBe(202);
        expect(res.body).toEqual({ ok: true });
      }
      await s.mail.waitFor(known.email, { subject: /reset/i });
      expect(record.map((r) => [r.mail.to, r.answered])).toEqual([[known.email, true]]);
    } finally {
      await s.close();
    }
  });

  it('sign-up answers a registered and a new address byte for byte alike, signs neither in, and mails each its own', async () => {
    const owner = await signUp(server.client(), { name: 'First' });
    const freshEmail = uniqueEmail('fresh');
    const onTaken = server.client();
    const onFresh = server.client();
    const taken = await onTaken.post('/api/auth/sign-up', { email: owner.email, password: 'a different passphrase', name: 'Second' });
    const fresh = await onFresh.post('/api/auth/sign-up', { email: freshEmail, password: 'a different passphrase', name: 'Second' });
    // The same status and the same bytes; no session for either.
    expect(taken.status).toBe(202);
    expect(fresh.status).toBe(taken.status);
    expect(fresh.text).toBe(taken.text);
    expect(taken.body).toEqual({ ok: true, message: 'Check your mail to finish creating your account' });
    expect(taken.headers.get('content-type')).toBe(fresh.headers.get('content-type'));
    expect(taken.headers.getSetCookie()).toEqual([]);
    expect(fresh.headers.getSetCookie()).toEqual([]);
    expect(onTaken.hasSession || onFresh.hasSession).toBe(false);
    expect((await onFresh.get('/api/auth/me')).status).toBe(401);

    // The registered address: its owner gets the notice, with no link that creates anything.
    const notice = await server.mail.waitFor(owner.email, { subject: /tried to create/i });
    expect(notice.text).toContain('already has one');
    expect(notice.text).toContain(`${server.url}/forgot-password`);
    expect(() => confirmationToken(notice.text)).toThrow();
    // The new address: a confirmation link; no account until it is used.
    const confirmation = await server.mail.waitFor(freshEmail, { subject: CONFIRM_SUBJECT });
    expect(await server.db.db.select().from(users).where(eq(users.email, freshEmail))).toHaveLength(0);
    await afterResponseSettled();
    // The attempt stored no pending sign-up (the owner's own one went when it was confirmed), and
    // the only confirmation mail that address ever got is the one for the owner's own sign-up.
    expect(await server.db.db.select().from(pendingSignUps).where(eq(pendingSignUps.email, owner.email))).toHaveLength(0);
    expect((await server.mail.all()).filter((m) => m.to.includes(owner.email) && CONFIRM_SUBJECT.test(m.subject))).toHaveLength(1);

    // The link creates the account and signs in; the password works.
    const token = confirmationToken(confirmation.text);
    const confirmer = server.client();
    const created = await confirmer.post('/api/auth/confirm-sign-up', { token });
    expect(created.status).toBe(200);
    expect(created.body.user).toMatchObject({ email: freshEmail, name: 'Second' });
    expect((await confirmer.get('/api/auth/me')).body.user.email).toBe(freshEmail);
    expect((await server.client().post('/api/auth/sign-in', { email: freshEmail, password: 'a different passphrase' })).status).toBe(200);
    // The owner's password is untouched by the attempt on their address.
    expect((await server.client().post('/api/auth/sign-in', { email: owner.email, password: 'a different passphrase' })).status).toBe(401);
    expect((await server.client().post('/api/auth/sign-in', { email: owner.email, password: owner.password })).status).toBe(200);

    // A used link is refused, clearly, and signs nobody in.
    const reuser = server.client();
    const reused = await reuser.post('/api/auth/confirm-sign-up', { token });
    expect(reused.status).toBe(400);
    expect(reused.body.error.code).toBe('invalid_token');
    expect(reused.body.error.message).toMatch(/already used/);
    expect(reuser.hasSession).toBe(false);

    // Repeated attempts do not become a stream of mail: one notice per address and window, and
    // the answer stays the same.
    const third = await server.client().post('/api/auth/sign-up', { email: owner.email, password: 'a different passphrase', name: 'Third' });
    expect(third.status).toBe(202);
    expect(third.text).toBe(taken.text);
    await afterResponseSettled();
    expect((await server.mail.all()).filter((m) => m.to.includes(owner.email) && /tried to create/i.test(m.subject))).toHaveLength(1);
  });

  it('sends sign-up mail only after answering (registered and new addresses alike)', async () => {
    // The same mailer spy as for resets: no timing is measured, only the order of events.
    const finished = new Set<string>();
    const record: { to: string; subject: string; answered: boolean }[] = [];
    const spy = (inner: Mailer): Mailer => ({
      async send(mail) {
        record.push({ to: mail.to, subject: mail.subject, answered: finished.has(mail.to) });
        await inner.send(mail);
      },
      close: () => inner.close(),
    });
    const s = await startApiServer({ wrapMailer: spy });
    try {
      s.http.on('request', (req, res) => {
        const id = String(req.headers['x-test-request'] ?? '');
        res.once('finish', () => finished.add(id));
      });
      const known = await signUp(s.client());
      record.length = 0;
      const fresh = uniqueEmail('fresh');
      for (const email of [known.email, fresh]) {
        const c = s.client();
        c.extraHeaders = { 'x-test-request': email };
        expect((await c.post('/api/auth/sign-up', { email, password: TEST_PASSWORD, name: 'Someone' })).status).toBe(202);
      }
      await s.mail.waitFor(known.email, { subject: /tried to create/i });
      await s.mail.waitFor(fresh, { subject: CONFIRM_SUBJECT });
      await afterResponseSettled();
      expect(record.map((r) => [r.to, r.answered]).sort()).toEqual([[known.email, true], [fresh, true]].sort());
    } finally {
      await s.close();
    }
  });
});

describe('6. limits per account and per workspace', () => {
  it('locks guessing on one account after its failure budget, from any address, until a reset', async () => {
    const s = await startApiServer({
      config: { accountLimits: { windowMs: 60_000, signInFailures: 3, resetRequests: 2, invitationsPerWorkspace: 3, invitationsPerInviter: 100 } },
    });
    try {
      const victim = await signUp(s.client());
      const statuses: number[] = [];
      for (let i = 0; i < 4; i++) {
        // a fresh client each time: no cookie, as from ever-new addresses
        statuses.push((await s.client().post('/api/auth/sign-in', { email: victim.email, password: `guess-number-${i}` })).status);
      }
      expect(statuses).toEqual([401, 401, 401, 429]);
      // Locked: the right password is not checked either (a right guess looks like a wrong one).
      const right = await s.client().post('/api/auth/sign-in', { email: victim.email, password: victim.password });
      expect(right.status).toBe(429);
      expect(right.body.error.code).toBe('rate_limited');
      // Another account is not affected.
      const other = await signUp(s.client());
      expect((await s.client().post('/api/auth/sign-in', { email: other.email, password: other.password })).status).toBe(200);
      // The window passes: the budget is back.
      s.clock.advance(60_001);
      expect((await s.client().post('/api/auth/sign-in', { email: victim.email, password: victim.password })).status).toBe(200);
      // A successful sign-in clears the count; a completed reset lifts a lock.
      for (let i = 0; i < 3; i++) await s.client().post('/api/auth/sign-in', { email: victim.email, password: 'wrong-password-x' });
      expect((await s.client().post('/api/auth/sign-in', { email: victim.email, password: victim.password })).status).toBe(429);
      await s.client().post('/api/auth/password-reset/request', { email: victim.email });
      const mail = await s.mail.waitFor(victim.email, { subject: /reset/i });
      const token = new URL(s.mail.linkIn(mail, '/reset-password')).searchParams.get('token')!;
      expect((await s.client().post('/api/auth/password-reset/confirm', { token, password: 'a fresh passphrase 2' })).status).toBe(204);
      expect((await s.client().post('/api/auth/sign-in', { email: victim.email, password: 'a fresh passphrase 2' })).status).toBe(200);
    } finally {
      await s.close();
    }
  });

  it('an unknown address locks the same way (the lock reveals nothing)', async () => {
    const s = await startApiServer({
      config: { accountLimits: { windowMs: 60_000, signInFailures: 2, resetRequests: 2, invitationsPerWorkspace: 3, invitationsPerInviter: 100 } },
    });
    try {
      const ghost = uniqueEmail('ghost');
      const statuses = [];
      for (let i = 0; i < 3; i++) statuses.push((await s.client().post('/api/auth/sign-in', { email: ghost, password: 'whatever-123' })).status);
      expect(statuses).toEqual([401, 401, 429]);
    } finally {
      await s.close();
    }
  });

  it('mails at most the reset budget per account and still answers 202', async () => {
    const s = await startApiServer({
      config: { accountLimits: { windowMs: 60_000, signInFailures: 100, resetRequests: 2, invitationsPerWorkspace: 3, invitationsPerInviter: 100 } },
    });
    try {
      const u = await signUp(s.client());
      for (let i = 0; i < 4; i++) expect((await s.client().post('/api/auth/password-reset/request', { email: u.email })).status).toBe(202);
      await s.mail.waitFor(u.email, { subject: /reset/i });
      // the work runs after each answer: wait until all of it has ended
      await afterResponseSettled();
      expect((await s.mail.all()).filter((m) => m.to.includes(u.email) && /reset/i.test(m.subject))).toHaveLength(2);
    } finally {
      await s.close();
    }
  });

  it('limits invitations per workspace and per inviter, and their subject carries no sender-chosen text', async () => {
    const s = await startApiServer({
      config: { accountLimits: { windowMs: 60_000, signInFailures: 100, resetRequests: 100, invitationsPerWorkspace: 3, invitationsPerInviter: 4 } },
    });
    try {
      const owner = s.client();
      await signUp(owner, { name: 'Sender' });
      const ws = await createWorkspace(owner, 'Urgent: verify your account at evil.example');
      const statuses = [];
      for (let i = 0; i < 5; i++) statuses.push((await owner.post(`/api/workspaces/${ws}/invitations`, { email: uniqueEmail('spam'), role: 'viewer' })).status);
      expect(statuses).toEqual([201, 201, 201, 429, 429]);
      // A second workspace of the same inviter: the inviter's own budget (4) is nearly spent.
      const ws2 = await createWorkspace(owner, 'Second');
      const more = [];
      for (let i = 0; i < 2; i++) more.push((await owner.post(`/api/workspaces/${ws2}/invitations`, { email: uniqueEmail('spam'), role: 'viewer' })).status);
      expect(more).toEqual([201, 429]);
      const mails = await s.mail.all();
      expect(mails.length).toBeGreaterThan(0);
      for (const m of mails) expect(m.subject).not.toContain('evil.example');
    } finally {
      await s.close();
    }
  });
});

describe('7. small things', () => {
  it('refuses line breaks and other control characters in names', async () => {
    const c = server.client();
    const bad = await c.post('/api/auth/sign-up', { email: uniqueEmail(), password: TEST_PASSWORD, name: 'Eve\r\nSubject: hi' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.name).toMatch(/control characters/i);
    await signUp(c);
    expect((await c.post('/api/workspaces', { name: 'Line one\nLine two' })).status).toBe(400);
    const ws = await createWorkspace(c);
    expect((await c.post(`/api/workspaces/${ws}/notebooks`, { title: 'Tab\there' })).status).toBe(400);
    expect((await c.patch(`/api/workspaces/${ws}`, { name: 'Next\u2028line' })).status).toBe(400);
  });

  it('refuses easy passwords on sign-up and reset', async () => {
    for (const password of [' '.repeat(10), 'a'.repeat(12), 'abababababab', '1234567890', 'Password123', 'abcdefghijklmn']) {
      const res = await server.client().post('/api/auth/sign-up', { email: uniqueEmail('weak'), password, name: 'Weak' });
      expect(res.status, password).toBe(400);
      expect(Object.keys(res.body.error.fields)).toEqual(['password']);
    }
    const res = await server.client().post('/api/auth/password-reset/confirm', { token: 'A'.repeat(43), password: 'qwertyuiop' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.password).toMatch(/common/);
  });

  it('refuses CSVs with NUL characters and reserved column names, saying why', async () => {
    const c = server.client();
    await signUp(c);
    const ws = await createWorkspace(c);
    const nul = await c.raw(`/api/workspaces/${ws}/datasets`, { method: 'POST', body: csvForm('x,y\n1,2\n3\u00004\n', { name: 'nul' }) });
    expect(nul.status).toBe(400);
    expect(nul.body.error.message).toMatch(/NUL characters.*line 3/);
    for (const name of ['__proto__', 'constructor']) {
      const res = await c.raw(`/api/workspaces/${ws}/datasets`, { method: 'POST', body: csvForm(`x,${name}\n1,2\n`, { name: 'proto' }) });
      expect(res.status).toBe(400);
      expect(res.body.error.message).toContain(`Column name "${name}" is reserved`);
    }
  });

  it('share-link dataset answers carry no workspace id', async () => {
    const c = server.client();
    await signUp(c);
    const ws = await createWorkspace(c);
    const nb = (await c.post(`/api/workspaces/${ws}/notebooks`, { title: 'With data' })).body.notebook;
    const up = await c.raw(`/api/workspaces/${ws}/datasets`, { method: 'POST', body: csvForm('x,y\n1,2\n', { name: 'pairs' }) });
    expect(up.status).toBe(201);
    const cell = await c.post(`/api/workspaces/${ws}/notebooks/${nb.id}/cells`, { kind: 'data', content: { datasetId: up.body.dataset.id } });
    expect(cell.status).toBe(201);
    const { token } = (await c.post(`/api/workspaces/${ws}/notebooks/${nb.id}/share-links`, {})).body;
    const res = await server.client().get(`/api/share/${token}/datasets/${up.body.dataset.id}`);
    expect(res.status).toBe(200);
    expect(res.body.dataset).toMatchObject({ id: up.body.dataset.id, name: 'pairs' });
    expect(res.body.dataset).not.toHaveProperty('workspaceId');
    expect(res.text).not.toContain(ws);
  });
});

describe('8. a checkout under a dot folder', () => {
  let dir: string;
  let s: TestServer;
  beforeAll(async () => {
    dir = await mkdtemp(path.join(os.tmpdir(), 'slackline-'));
    const clientDir = path.join(dir, '.projects', 'slackline', 'dist', 'client');
    await cp(path.join(REPO_ROOT, 'dist/client'), clientDir, { recursive: true });
    s = await startTestServer({ clientDir });
  });
  afterAll(async () => {
    await s?.close();
    await rm(dir, { recursive: true, force: true });
  });

  it('serves the single-page fallback', async () => {
    for (const p of ['/', '/sign-in', '/w/abc/n/def']) {
      const res = await s.client().get(p);
      expect(res.status, p).toBe(200);
      expect(res.text).toContain('<div id="root">');
    }
    // and the built assets beside it
    const script = /src="(\/assets\/[^"]+\.js)"/.exec((await s.client().get('/')).text)![1];
    expect((await s.client().get(script)).status).toBe(200);
  });
});
