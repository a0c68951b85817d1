/**
 * server/index.ts as `npm start` runs it: reads the environment, starts the mail capture, serves
 * the API, delivers mail into the capture, and exits cleanly on SIGTERM.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { TestClient, devMailReader, signUp, createWorkspace, uniqueEmail } from '../helpers/http';
import { REPO_ROOT } from '../helpers/server';
import { freePort, rawRequest } from '../helpers/net';


let tdb: TestDatabase;
let child: ChildProcess;
let url: string;
let output = '';

beforeAll(async () => {
  tdb = await createTestDatabase();
  const port = await freePort();
  url = `http://127.0.0.1:${port}`;
  child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: REPO_ROOT,
    env: { ...process.env, NODE_ENV: 'development', PORT: String(port), DATABASE_URL: tdb.url, SERVE_CLIENT: 'false', SMTP_URL: '' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout!.on('data', (d) => (output += d));
  child.stderr!.on('data', (d) => (output += d));
  const deadline = Date.now() + 30_000;
  for (;;) {
    try {
      if ((await fetch(`${url}/api/health`)).ok) break;
    } catch {
      /* not listening yet */
    }
    if (Date.now() > deadline || child.exitCode !== null) throw new Error(`server did not start:\n${output}`);
    await new Promise((r) => setTimeout(r, 200));
  }
});

afterAll(async () => {
  if (child && child.exitCode === null) child.kill('SIGKILL');
  await tdb.drop();
});

describe('the server process', () => {
  it('serves the API and captures mail without SMTP_URL', async () => {
    expect(output).toMatch(/mail capture on smtp:\/\/127\.0\.0\.1:\d+/);
    // The start prints the capture page's link with this start's key.
    const printed = /read it at (\S+\/dev\/mail\?key=([A-Za-z0-9_-]+))/.exec(output);
    expect(printed).not.toBeNull();
    const key = printed![2];
    // Signing up goes through the confirmation mail, read from the capture with the key.
    const owner = new TestClient(url, url, devMailReader(url, key));
    await signUp(owner);
    const ws = await createWorkspace(owner, 'Process check');
    const email = uniqueEmail('captured');
    expect((await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'viewer' })).status).toBe(201);

    // Without the key the owner sees only mail to their own address, not the invitation.
    const own = await owner.get(`/api/dev/mail?to=${encodeURIComponent(email)}`);
    expect(own.status).toBe(200);
    expect(own.body.messages).toHaveLength(0);
    // Nobody signed in: refused.
    expect((await new TestClient(url).get('/api/dev/mail')).status).toBe(403);

    // The printed link: the key goes into an HttpOnly cookie and the address bar loses it.
    const reader = new TestClient(url);
    const opened = await reader.raw(`/dev/mail?key=${key}`);
    expect(opened.status).toBe(303);
    expect(opened.headers.get('location')).toBe('/dev/mail');
    expect(opened.headers.getSetCookie().join('\n')).toMatch(/slackline_devmail=.*HttpOnly.*SameSite=Strict/i);
    const mail = await reader.get(`/api/dev/mail?to=${encodeURIComponent(email)}`);
    expect(mail.status).toBe(200);
    expect(mail.body.messages).toHaveLength(1);
    expect(mail.body.messages[0].text).toContain(`${url}/invite/`);
  });

  it('answers only to its own host names', async () => {
    const port = new URL(url).port;
    const evil = await rawRequest(`${url}/api/dev/mail`, { headers: { host: 'evil.example:3999' } });
    expect(evil.status).toBe(421);
    // Both loopback names are this start's own (no PUBLIC_URL given).
    expect((await rawRequest(`${url}/api/auth/me`, { headers: { host: `localhost:${port}` } })).status).toBe(401);
    expect((await rawRequest(`${url}/api/auth/me`, { headers: { host: `127.0.0.1:${port}` } })).status).toBe(401);
  });

  it('stops cleanly on SIGTERM', async () => {
    const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
    child.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(output).toContain('SIGTERM: stopping');
  });
});

describe('a production start', () => {
  it('refuses to run the mail capture', async () => {
    const port = await freePort();
    const prod = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
      cwd: REPO_ROOT,
      env: { ...process.env, NODE_ENV: 'production', PORT: String(port), DATABASE_URL: tdb.url, SERVE_CLIENT: 'false', SMTP_URL: '' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    prod.stdout!.on('data', (d) => (out += d));
    prod.stderr!.on('data', (d) => (out += d));
    const code = await new Promise<number | null>((resolve) => prod.once('exit', (c) => resolve(c)));
    expect(code).not.toBe(0);
    expect(out).toContain('SMTP_URL is required in production');
    expect(out).not.toMatch(/mail capture on/);
  });
});
