/**
 * Bad input: malformed JSON, oversized bodies, wrong types, unknown fields, hostile-looking
 * strings. Each gets a clear 4xx in the one error shape, and nothing is stored half-way.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startApiServer, type TestServer } from '../helpers/server';
import { type TestClient, createWorkspace, signUp } from '../helpers/http';
import { countRows } from '../helpers/db';
import { apiErrorSchema } from '../../shared/api/common';

let server: TestServer;
let alice: TestClient;
let ws: string;
const TABLES = ['users', 'workspaces', 'memberships', 'notebooks', 'invitations', 'share_links', 'audit_log'];

async function counts() {
  const out: Record<string, number> = {};
  for (const t of TABLES) out[t] = await countRows(server.db.handle, t);
  return out;
}

beforeAll(async () => {
  server = await startApiServer();
  alice = server.client();
  await signUp(alice);
  ws = await createWorkspace(alice);
});
afterAll(() => server.close());

function expectErrorShape(body: unknown, code: string) {
  const parsed = apiErrorSchema.parse(body);
  expect(parsed.error.code).toBe(code);
  expect(parsed.error.message.length).toBeGreaterThan(0);
}

describe('bad input', () => {
  it('malformed JSON → 400 malformed_json', async () => {
    const before = await counts();
    for (const body of ['{"name": "x"', '{name: "x"}', 'null garbage', '[1,2,']) {
      const res = await alice.raw(`/api/workspaces`, { method: 'POST', headers: { 'content-type': 'application/json' }, body });
      expect(res.status).toBe(400);
      expectErrorShape(res.body, 'malformed_json');
    }
    expect(await counts()).toEqual(before);
  });

  it('oversized body → 413 payload_too_large', async () => {
    const before = await counts();
    const res = await alice.post(`/api/workspaces/${ws}/notebooks`, { title: 'x'.repeat(200_000) });
    expect(res.status).toBe(413);
    expectErrorShape(res.body, 'payload_too_large');
    expect(await counts()).toEqual(before);
  });

  it('wrong types and missing fields → 400 with a message per field', async () => {
    const before = await counts();
    const cases: [string, string, unknown, string[]][] = [
      ['POST', '/api/workspaces', { name: 42 }, ['name']],
      ['POST', '/api/workspaces', {}, ['name']],
      ['POST', '/api/workspaces', { name: '   ' }, ['name']],
      ['POST', '/api/workspaces', { name: 'x'.repeat(81) }, ['name']],
      ['POST', '/api/workspaces', { name: 'tab\u0007bell' }, ['name']],
      ['POST', '/api/workspaces', ['Orchard'], ['body']],
      ['POST', `/api/workspaces/${ws}/invitations`, { email: 'nobody', role: 'boss' }, ['email', 'role']],
      ['POST', `/api/workspaces/${ws}/invitations`, { email: ['a@b.co'], role: null }, ['email', 'role']],
      ['POST', `/api/workspaces/${ws}/notebooks`, { title: { $ne: '' } }, ['title']],
      ['POST', '/api/auth/sign-in', { email: 'a@b.co', password: 12345678901 }, ['password']],
      ['POST', `/api/workspaces/${ws}/notebooks/abcdefghijklmnop/share-links`, { expiresAt: 'tomorrow' }, ['expiresAt']],
    ];
    for (const [method, path, body, fields] of cases) {
      const res = await alice.request(method, path, body);
      expect(res.status, `${method} ${path} ${JSON.stringify(body)}`).toBe(400);
      expectErrorShape(res.body, 'bad_request');
      expect(Object.keys(res.body.error.fields).sort(), JSON.stringify(body)).toEqual(fields);
    }
    expect(await counts()).toEqual(before);
  });

  it('unknown fields are rejected, not ignored', async () => {
    const before = await counts();
    const res = await alice.post('/api/workspaces', { name: 'Fine name', role: 'owner', id: 'chosen' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ role: 'Unknown field', id: 'Unknown field' });
    const r2 = await server.client().post('/api/auth/sign-up', {
      email: 'sneaky@example.test', password: 'long-enough-pass', name: 'S', isAdmin: true,
    });
    expect(r2.status).toBe(400);
    expect(r2.body.error.fields).toEqual({ isAdmin: 'Unknown field' });
    const r3 = await alice.get('/api/workspaces?include=all');
    expect(r3.status).toBe(400);
    expect(r3.body.error.fields).toEqual({ include: 'Unknown field' });
    expect(await counts()).toEqual(before);
  });

  it('malformed ids in the path are a 404 or 400, never a server error', async () => {
    for (const path of [
      "/api/workspaces/1'%20OR%20'1'='1",
      '/api/workspaces/%3Cscript%3E',
      `/api/workspaces/${ws}/notebooks/..%2F..%2Fetc`,
      `/api/workspaces/${ws}/members/${'z'.repeat(100)}`,
    ]) {
      const res = await alice.get(path);
      expect([400, 404], path).toContain(res.status);
      expect(res.body.error).toBeDefined();
    }
  });

  it('stores SQL-ish and script-ish names verbatim and returns them as JSON data', async () => {
    const names = [
      "Robert'); DROP TABLE workspaces; --",
      '<script>alert("x")</script>',
      '" OR 1=1 -- \\ %_',
      '<img src=x onerror=alert(1)> & ☕ Kaffeemischung — 咖啡',
    ];
    for (const name of names) {
      const created = await alice.post('/api/workspaces', { name });
      expect(created.status).toBe(201);
      expect(created.headers.get('content-type')).toMatch(/^application\/json/);
      expect(created.headers.get('x-content-type-options')).toBe('nosniff');
      const id = created.body.workspace.id;
      const got = await alice.get(`/api/workspaces/${id}`);
      // Returned exactly as given; in the raw JSON text the characters are plain data.
      expect(got.body.workspace.name).toBe(name);
      expect(JSON.parse(got.text).workspace.name).toBe(name);
      const nb = await alice.post(`/api/workspaces/${id}/notebooks`, { title: name });
      expect((await alice.get(`/api/workspaces/${id}/notebooks/${nb.body.notebook.id}`)).body.notebook.title).toBe(name);
    }
    // The tables are all still there.
    expect(await countRows(server.db.handle, 'workspaces')).toBeGreaterThanOrEqual(names.length);
  });

  it('unknown API routes answer 404 in the error shape', async () => {
    const res = await alice.get('/api/no-such-thing');
    expect(res.status).toBe(404);
    expectErrorShape(res.body, 'not_found');
    const post = await alice.post('/api/workspaces/x/unknown', {});
    expect(post.status).toBe(404);
  });
});
