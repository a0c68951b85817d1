/** startTestServer serves the built client with a single-page fallback next to the API. */
import fs from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { REPO_ROOT, startTestServer, type TestServer } from '../helpers/server';

let server: TestServer;
beforeAll(async () => {
  server = await startTestServer();
});
afterAll(() => server.close());

describe('serving the built client', () => {
  it('answers client routes with index.html and API routes with JSON', async () => {
    const index = fs.readFileSync(path.join(REPO_ROOT, 'dist/client/index.html'), 'utf8');
    for (const p of ['/', '/workspaces/abc', '/s/some-token', '/invite/xyz']) {
      const res = await fetch(server.url + p);
      expect(res.status, p).toBe(200);
      expect(res.headers.get('content-type')).toMatch(/text\/html/);
      expect(await res.text()).toBe(index);
    }
    const api = await fetch(server.url + '/api/nope');
    expect(api.status).toBe(404);
    expect((await api.json()).error.code).toBe('not_found');
  });

  it('sends security headers and loads no script from elsewhere', async () => {
    const res = await fetch(server.url + '/');
    const csp = res.headers.get('content-security-policy') ?? '';
    expect(csp).toContain("script-src 'self'");
    expect(csp).toContain("frame-ancestors 'none'");
    expect(res.headers.get('x-content-type-options')).toBe('nosniff');
    const html = await res.text();
    for (const m of html.matchAll(/<(?:script|link)[^>]+(?:src|href)="([^"]+)"/g)) {
      expect(m[1].startsWith('/'), m[1]).toBe(true);
    }
  });
});
