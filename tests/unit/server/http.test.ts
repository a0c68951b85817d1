/** Pure server helpers: field messages from zod issues, tokens, the test clock, configuration. */
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { issuesToFields } from '../../../server/http/route';
import { hashToken, newId, newToken } from '../../../server/lib/ids';
import { ManualClock } from '../../../server/lib/clock';
import { configFromEnv } from '../../../server/config';
import { idSchema, roleAtLeast, tokenSchema } from '../../../shared/api/common';
import { routePath, routes } from '../../../shared/api/routes';

describe('issuesToFields', () => {
  it('names each bad field by its dotted path and unknown keys by their name', () => {
    const schema = z.strictObject({ name: z.string().min(1, 'Required'), nested: z.strictObject({ n: z.number() }) });
    const r = schema.safeParse({ name: '', nested: { n: 'x', extra: 1 }, sneaky: true });
    expect(r.success).toBe(false);
    expect(issuesToFields(r.error!.issues, 'body')).toEqual({
      name: 'Required',
      'nested.n': expect.any(String),
      'nested.extra': 'Unknown field',
      sneaky: 'Unknown field',
    });
  });
  it('puts a root-level problem under the part name', () => {
    const r = z.strictObject({ a: z.string() }).safeParse(['not', 'an', 'object']);
    expect(Object.keys(issuesToFields(r.error!.issues, 'body'))).toEqual(['body']);
  });
});

describe('ids and tokens', () => {
  it('ids match the id schema; tokens match the token schema and carry 256 bits', () => {
    const ids = new Set(Array.from({ length: 1000 }, newId));
    expect(ids.size).toBe(1000);
    for (const id of ids) expect(idSchema.safeParse(id).success).toBe(true);
    const t = newToken();
    expect(tokenSchema.safeParse(t).success).toBe(true);
    expect(Buffer.from(t, 'base64url')).toHaveLength(32);
  });
  it('stores SHA-256 hex of the token (checked against node:crypto directly)', () => {
    expect(hashToken('abc')).toBe(createHash('sha256').update('abc').digest('hex'));
    // FIPS 180-2 test vector for "abc".
    expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});

describe('ManualClock', () => {
  it('advances and sets; frozen clocks stand still', async () => {
    const frozen = new ManualClock(new Date('2026-03-01T00:00:00Z'), { frozen: true });
    frozen.advance(60_000);
    expect(frozen.now().toISOString()).toBe('2026-03-01T00:01:00.000Z');
    await new Promise((r) => setTimeout(r, 5));
    expect(frozen.now().toISOString()).toBe('2026-03-01T00:01:00.000Z');
    const ticking = new ManualClock(0);
    await new Promise((r) => setTimeout(r, 20));
    expect(ticking.now().getTime()).toBeGreaterThanOrEqual(15);
    ticking.set(1_000_000);
    expect(Math.abs(ticking.now().getTime() - 1_000_000)).toBeLessThan(50);
  });
});

describe('roles and routes', () => {
  it('orders roles owner > editor > reviewer > viewer', () => {
    expect(roleAtLeast('owner', 'editor')).toBe(true);
    expect(roleAtLeast('editor', 'editor')).toBe(true);
    expect(roleAtLeast('reviewer', 'editor')).toBe(false);
    expect(roleAtLeast('viewer', 'reviewer')).toBe(false);
    expect(roleAtLeast(null, 'viewer')).toBe(false);
  });
  it('fills route paths and refuses a missing parameter', () => {
    expect(routePath('getNotebook', { workspaceId: 'a1', notebookId: 'b2' })).toBe('/api/workspaces/a1/notebooks/b2');
    expect(() => routePath('getNotebook', { workspaceId: 'a1' })).toThrow(/notebookId/);
  });
  it('has unique method + path pairs under /api', () => {
    const keys = Object.values(routes).map((r) => `${r.method} ${r.path}`);
    expect(new Set(keys).size).toBe(keys.length);
    for (const k of keys) expect(k).toMatch(/^(GET|POST|PATCH|DELETE) \/api\//);
  });
});

describe('configFromEnv', () => {
  it('reads the documented variables', () => {
    const c = configFromEnv(
      { PORT: '4000', NODE_ENV: 'production', TRUST_PROXY: '1', ALLOWED_ORIGINS: 'http://a.test, http://b.test', PUBLIC_URL: 'https://x.test/' },
      null,
    );
    expect(c).toMatchObject({
      production: true,
      trustProxy: 1,
      allowedOrigins: ['http://a.test', 'http://b.test'],
      publicUrl: 'https://x.test',
      checkResponses: false,
    });
    expect(configFromEnv({ PORT: '4000' }, null).publicUrl).toBe('http://127.0.0.1:4000');
  });
});

describe('errorHandler', () => {
  it('answers a 404 from a file send with the not_found code', async () => {
    const { errorHandler } = await import('../../../server/http/error-handler');
    const { defaultConfig } = await import('../../../server/config');
    let status = 0;
    let body: unknown;
    const res = { headersSent: false, status(s: number) { status = s; return this; }, json(b: unknown) { body = b; return this; } };
    const err = Object.assign(new Error('Not Found'), { status: 404, statusCode: 404 });
    errorHandler(defaultConfig({ logErrors: false }))(err, { method: 'GET', originalUrl: '/x' } as never, res as never, () => {});
    expect(status).toBe(404);
    expect(body).toEqual({ error: { code: 'not_found', message: 'Not Found' } });
  });
});

describe('passwordProblem', () => {
  it('refuses short, blank, one-letter, common and straight-run passwords; accepts passphrases', async () => {
    const { passwordProblem } = await import('../../../shared/api/common');
    expect(passwordProblem('short')).toMatch(/10/);
    expect(passwordProblem(' '.repeat(10))).toMatch(/spaces/);
    expect(passwordProblem('zzzzzzzzzzzz')).toMatch(/different/);
    expect(passwordProblem('QwertyUiop')).toMatch(/common/);
    expect(passwordProblem('lmnopqrstu')).toMatch(/consecutive/);
    expect(passwordProblem('correct-horse-battery-17')).toBeNull();
    expect(passwordProblem('silt and clay fractions')).toBeNull();
  });
});

describe('shouldSeedDemo', () => {
  it('never seeds the published demo account in production unless asked', async () => {
    const { shouldSeedDemo } = await import('../../../server/seed/demo');
    expect(shouldSeedDemo({ NODE_ENV: 'production' })).toBe(false);
    expect(shouldSeedDemo({ NODE_ENV: 'production', SEED_DEMO: 'true' })).toBe(true);
    expect(shouldSeedDemo({})).toBe(true);
    expect(shouldSeedDemo({ SEED_DEMO: 'false' })).toBe(false);
  });
});

describe('configFromEnv origins and keys', () => {
  it('answers as localhost and 127.0.0.1 on PORT without PUBLIC_URL; has a per-start capture key outside production', () => {
    const local = configFromEnv({ PORT: '4100' }, null);
    expect(local.allowedOrigins).toEqual(expect.arrayContaining(['http://localhost:4100', 'http://127.0.0.1:4100']));
    expect(local.devMailKey).toMatch(/^[A-Za-z0-9_-]{32}$/);
    expect(configFromEnv({ PORT: '4100' }, null).devMailKey).not.toBe(local.devMailKey);
    expect(configFromEnv({ NODE_ENV: 'production', PUBLIC_URL: 'https://x.test' }, null)).toMatchObject({ devMailKey: null, allowedOrigins: [] });
  });
});
