/** Accounts: sign up (confirmed by mail), sign in, sign out, me, cookies, origin check, rate limit, password reset. */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { startApiServer, type TestServer } from '../helpers/server';
import { CONFIRM_SUBJECT, TEST_PASSWORD, TestClient, confirmationToken, signUp, uniqueEmail } from '../helpers/http';
import { countRows } from '../helpers/db';
import { passwordResets, pendingSignUps, users } from '../../server/db/schema';
import { RESET_TOKEN_TTL_MS, SIGN_UP_TOKEN_TTL_MS } from '../../server/routes/auth';

/** Ask for an account and return the token of the confirmation mail it brings. */
async function requestSignUp(c: TestClient, body: { email: string; password?: string; name?: string; next?: string }): Promise<string> {
  const to = body.email.trim().toLowerCase();
  const before = (await server.mail.all()).filter((m) => m.to.includes(to) && CONFIRM_SUBJECT.test(m.subject)).length;
  const res = await c.post('/api/auth/sign-up', { password: TEST_PASSWORD, name: 'Someone', ...body });
  expect(res.status).toBe(202);
  let mails = [] as Awaited<ReturnType<TestServer['mail']['all']>>;
  await expect
    .poll(async () => {
      mails = (await server.mail.all()).filter((m) => m.to.includes(to) && CONFIRM_SUBJECT.test(m.subject));
      return mails.length;
    }, { timeout: 10_000 })
    .toBeGreaterThan(before);
  return confirmationToken(mails[0].text);
}

let server: TestServer;
beforeAll(async () => {
  server = await startApiServer();
});
afterAll(() => server.close());

describe('sign up, sign in, sign out', () => {
  it('signs up through the mailed link, is signed in, signs out, signs in again', async () => {
    const c = server.client();
    const email = uniqueEmail('Ada');
    const token = await requestSignUp(c, { email: `  ${email.toUpperCase()} `, name: 'Ada Ortiz' });
    // Asking for an account signs nobody in and creates no account yet.
    expect(c.hasSession).toBe(false);
    expect(await server.db.db.select().from(users).where(eq(users.email, email.toLowerCase()))).toHaveLength(0);
    // Only a hash of the token is stored, and the password only as an argon2id hash.
    const [pending] = await server.db.db.select().from(pendingSignUps).where(eq(pendingSignUps.email, email.toLowerCase()));
    expect(pending.tokenHash).not.toBe(token);
    expect(pending.passwordHash.startsWith('$argon2id$')).toBe(true);
    const up = await c.post('/api/auth/confirm-sign-up', { token });
    expect(up.status).toBe(200);
    // E-mail addresses are trimmed and compared case-insensitively.
    expect(up.body.user).toMatchObject({ email: email.toLowerCase(), name: 'Ada Ortiz' });
    expect(up.body.user).not.toHaveProperty('passwordHash');

    const me = await c.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.user.id).toBe(up.body.user.id);

    const out = await c.post('/api/auth/sign-out');
    expect(out.status).toBe(204);
    expect(c.hasSession).toBe(false);
    expect((await c.get('/api/auth/me')).status).toBe(401);

    const wrong = await c.post('/api/auth/sign-in', { email, password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.code).toBe('invalid_credentials');

    const unknown = await c.post('/api/auth/sign-in', { email: uniqueEmail('nobody'), password: TEST_PASSWORD });
    expect(unknown.status).toBe(401);
    // The same message whether or not the account exists.
    expect(unknown.body.error.message).toBe(wrong.body.error.message);

    const inAgain = await c.post('/api/auth/sign-in', { email, password: TEST_PASSWORD });
    expect(inAgain.status).toBe(200);
    expect((await c.get('/api/auth/me')).body.user.email).toBe(email.toLowerCase());
  });

  it('stores an argon2id hash, never the password', async () => {
    const c = server.client();
    const u = await signUp(c);
    const [row] = await server.db.db.select().from(users).where(eq(users.id, u.id));
    expect(row.passwordHash.startsWith('$argon2id$')).toBe(true);
    expect(row.passwordHash).not.toContain(u.password);
  });

  it('makes no second account with the same e-mail', async () => {
    const email = uniqueEmail();
    const first = await signUp(server.client(), { email });
    const again = await server.client().post('/api/auth/sign-up', { email, password: TEST_PASSWORD, name: 'Twin' });
    expect(again.status).toBe(202);
    expect(again.headers.getSetCookie()).toEqual([]);
    const notice = await server.mail.waitFor(email, { subject: /tried to create/ });
    expect(() => confirmationToken(notice.text)).toThrow();
    const rows = await server.db.db.select().from(users).where(eq(users.email, email));
    expect(rows.map((r) => r.id)).toEqual([first.id]);
  });

  it('one confirmed link makes every other link for the same address stop working', async () => {
    const email = uniqueEmail('twice');
    const t1 = await requestSignUp(server.client(), { email, name: 'First try' });
    const t2 = await requestSignUp(server.client(), { email, name: 'Second try' });
    const ok = await server.client().post('/api/auth/confirm-sign-up', { token: t2 });
    expect(ok.status).toBe(200);
    expect(ok.body.user.name).toBe('Second try');
    const late = await server.client().post('/api/auth/confirm-sign-up', { token: t1 });
    expect(late.status).toBe(400);
    expect(late.body.error.code).toBe('invalid_token');
    expect(late.headers.getSetCookie()).toEqual([]);
  });

  it('refuses a confirmation link after 24 hours (injected clock)', async () => {
    const email = uniqueEmail('late');
    const token = await requestSignUp(server.client(), { email });
    server.clock.advance(SIGN_UP_TOKEN_TTL_MS + 1000);
    try {
      const res = await server.client().post('/api/auth/confirm-sign-up', { token });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid_token');
      expect(res.body.error.message).toMatch(/expired/);
    } finally {
      server.clock.advance(-(SIGN_UP_TOKEN_TTL_MS + 1000));
    }
    expect(await server.db.db.select().from(users).where(eq(users.email, email))).toHaveLength(0);
  });

  it('carries a path on this site into the link, and refuses any other next', async () => {
    const email = uniqueEmail('next');
    await requestSignUp(server.client(), { email, next: '/invite/abc_DEF-123' });
    const mail = await server.mail.waitFor(email, { subject: CONFIRM_SUBJECT });
    const link = new URL(server.mail.linkIn(mail, '/confirm-sign-up'));
    expect(link.origin).toBe(server.url);
    expect(link.searchParams.get('next')).toBe('/invite/abc_DEF-123');
    for (const next of ['//evil.example/x', 'https://evil.example', '/\\evil.example', 'invite/x', '/a b']) {
      const res = await server.client().post('/api/auth/sign-up', { email: uniqueEmail(), password: TEST_PASSWORD, name: 'N', next });
      expect(res.status, next).toBe(400);
      expect(Object.keys(res.body.error.fields)).toEqual(['next']);
    }
  });

  it('rejects weak input with field messages', async () => {
    const res = await server.client().post('/api/auth/sign-up', { email: 'not-an-address', password: 'short', name: '' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_request');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'name', 'password']);
  });

  it('sets an httpOnly, SameSite=Lax session cookie, Secure only over https', async () => {
    const token = await requestSignUp(server.client(), { email: uniqueEmail(), name: 'P' });
    const plain = await server.client().post('/api/auth/confirm-sign-up', { token });
    const cookie = plain.headers.getSetCookie().find((s) => s.startsWith('slackline_session='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/Secure/i);

    // Behind a TLS-terminating proxy (trust proxy on), the cookie is Secure.
    const proxied = await startApiServer({ config: { trustProxy: 1, publicUrl: 'https://slackline.example' } });
    try {
      const c = proxied.client();
      c.origin = 'https://slackline.example';
      const headers = { 'content-type': 'application/json', 'x-forwarded-proto': 'https', 'x-forwarded-host': 'slackline.example' };
      const email = uniqueEmail();
      const asked = await c.raw('/api/auth/sign-up', { method: 'POST', headers, body: JSON.stringify({ email, password: TEST_PASSWORD, name: 'Q' }) });
      expect(asked.status).toBe(202);
      const mail = await proxied.mail.waitFor(email, { subject: CONFIRM_SUBJECT });
      expect(proxied.mail.linkIn(mail, '/confirm-sign-up').startsWith('https://slackline.example/confirm-sign-up?token=')).toBe(true);
      const res = await c.raw('/api/auth/confirm-sign-up', { method: 'POST', headers, body: JSON.stringify({ token: confirmationToken(mail.text) }) });
      expect(res.status).toBe(200);
      expect(res.headers.getSetCookie().find((s) => s.startsWith('slackline_session='))).toMatch(/;\s*Secure/i);
    } finally {
      await proxied.close();
    }
  });

  it('refuses state-changing requests from another origin or without one', async () => {
    const body = { email: uniqueEmail(), password: TEST_PASSWORD, name: 'Mallory' };
    const foreign = new TestClient(server.url, 'https://evil.example');
    const r1 = await foreign.post('/api/auth/sign-up', body);
    expect(r1.status).toBe(403);
    const none = new TestClient(server.url, null);
    const r2 = await none.post('/api/auth/sign-up', body);
    expect(r2.status).toBe(403);
    expect(r2.body.error.code).toBe('forbidden');
    // Nothing was created, not even a pending sign-up.
    const [row] = await server.db.db.select().from(users).where(eq(users.email, body.email));
    expect(row).toBeUndefined();
    expect(await server.db.db.select().from(pendingSignUps).where(eq(pendingSignUps.email, body.email))).toHaveLength(0);
    // Reads need no Origin.
    expect((await none.get('/api/health')).status).toBe(200);
  });

  it('rate-limits sign-in attempts per address', async () => {
    const limited = await startApiServer({ config: { authRateLimit: { windowMs: 60_000, limit: 3 } } });
    try {
      const c = limited.client();
      const statuses: number[] = [];
      for (let i = 0; i < 5; i++) {
        statuses.push((await c.post('/api/auth/sign-in', { email: 'x@example.test', password: 'whatever-123' })).status);
      }
      expect(statuses).toEqual([401, 401, 401, 429, 429]);
      const last = await c.post('/api/auth/sign-in', { email: 'x@example.test', password: 'whatever-123' });
      expect(last.body.error.code).toBe('rate_limited');
      expect(last.headers.get('ratelimit-policy')).toBeTruthy();
    } finally {
      await limited.close();
    }
  });
});

describe('password reset by e-mail', () => {
  const NEW_PASSWORD = 'a-new-password-99';

  it('mails a single-use link; the new password works, the old one and old sessions do not', async () => {
    const c = server.client();
    const u = await signUp(c, { name: 'Rosa' });
    const other = server.client();
    await other.post('/api/auth/sign-in', { email: u.email, password: u.password });
    expect((await other.get('/api/auth/me')).status).toBe(200);

    const anon = server.client();
    const req = await anon.post('/api/auth/password-reset/request', { email: u.email });
    expect(req.status).toBe(202);
    const mail = await server.mail.waitFor(u.email, { subject: /reset/i });
    const link = new URL(server.mail.linkIn(mail, '/reset-password'));
    expect(link.origin).toBe(server.url);
    const token = link.searchParams.get('token')!;
    expect(token.length).toBeGreaterThanOrEqual(43);
    // Only a hash of the token is in the database.
    const stored = await server.db.db.select().from(passwordResets);
    expect(stored.some((r) => r.tokenHash === token)).toBe(false);

    const done = await anon.post('/api/auth/password-reset/confirm', { token, password: NEW_PASSWORD });
    expect(done.status).toBe(204);
    // Every session of the account ended.
    expect((await c.get('/api/auth/me')).status).toBe(401);
    expect((await other.get('/api/auth/me')).status).toBe(401);

    expect((await anon.post('/api/auth/sign-in', { email: u.email, password: u.password })).status).toBe(401);
    expect((await anon.post('/api/auth/sign-in', { email: u.email, password: NEW_PASSWORD })).status).toBe(200);

    // Single use.
    const again = await server.client().post('/api/auth/password-reset/confirm', { token, password: 'yet-another-pass-1' });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe('invalid_token');
  });

  it('expires after one hour (injected clock)', async () => {
    const u = await signUp(server.client());
    await server.client().post('/api/auth/password-reset/request', { email: u.email });
    const mail = await server.mail.waitFor(u.email, { subject: /reset/i });
    const token = new URL(server.mail.linkIn(mail, '/reset-password')).searchParams.get('token')!;
    server.clock.advance(RESET_TOKEN_TTL_MS + 1000);
    try {
      const res = await server.client().post('/api/auth/password-reset/confirm', { token, password: NEW_PASSWORD });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('invalid_token');
    } finally {
      server.clock.advance(-(RESET_TOKEN_TTL_MS + 1000));
    }
    // The old password still works.
    expect((await server.client().post('/api/auth/sign-in', { email: u.email, password: u.password })).status).toBe(200);
  });

  it('answers the same for an unknown address and sends nothing', async () => {
    const before = await countRows(server.db.handle, 'mail_outbox');
    const email = uniqueEmail('ghost');
    const res = await server.client().post('/api/auth/password-reset/request', { email });
    expect(res.status).toBe(202);
    expect(res.body).toEqual({ ok: true });
    expect(await countRows(server.db.handle, 'mail_outbox')).toBe(before);
  });

  it('rejects an invented token', async () => {
    const res = await server.client().post('/api/auth/password-reset/confirm', {
      token: 'A'.repeat(43),
      password: NEW_PASSWORD,
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_token');
  });
});
