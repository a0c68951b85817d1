/**
 * server/index.ts as `npm start` runs it: reads the environment, starts the mail capture, serves
 * the API, delivers mail into the capture, and exits cleanly on SIGTERM.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { TestClient, signUp, createWorkspace, uniqueEmail } from '../helpers/http';
import { REPO_ROOT } from '../helpers/server';
import { freePort } from '../helpers/net';


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
    const owner = new TestClient(url);
    await signUp(owner);
    const ws = await createWorkspace(owner, 'Process check');
    const email = uniqueEmail('captured');
    expect((await owner.post(`/api/workspaces/${ws}/invitations`, { email, role: 'viewer' })).status).toBe(201);
    const mail = await owner.get(`/api/dev/mail?to=${encodeURIComponent(email)}`);
    expect(mail.status).toBe(200);
    expect(mail.body.messages).toHaveLength(1);
    expect(mail.body.messages[0].text).toContain(`${url}/invite/`);
    expect(output).toMatch(/mail capture on smtp:\/\/127\.0\.0\.1:\d+/);
  });

  it('stops cleanly on SIGTERM', async () => {
    const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
    child.kill('SIGTERM');
    expect(await exited).toBe(0);
    expect(output).toContain('SIGTERM: stopping');
  });
});
