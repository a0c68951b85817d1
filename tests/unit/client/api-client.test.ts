// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { ApiError, apiFetch, callRoute, issuesToFields, toApiError } from '@/lib/api-client';
import { ISO, mockFetch } from './test-utils';

afterEach(() => vi.unstubAllGlobals());

describe('toApiError', () => {
  it('maps the API error shape to a typed error with field messages', () => {
    const e = toApiError(400, {
      error: { code: 'bad_request', message: 'Invalid input', fields: { email: 'Not a valid e-mail address', 'a.b': 'x' } },
    });
    expect(e).toBeInstanceOf(ApiError);
    expect(e.status).toBe(400);
    expect(e.code).toBe('bad_request');
    expect(e.message).toBe('Invalid input');
    expect(e.field('email')).toBe('Not a valid e-mail address');
    expect(e.field('a.b')).toBe('x');
    expect(e.field('password')).toBeUndefined();
    expect(e.hasFieldErrors).toBe(true);
  });

  it('keeps a domain code such as last_owner without fields', () => {
    const e = toApiError(409, { error: { code: 'last_owner', message: 'The last owner cannot be demoted' } });
    expect(e.code).toBe('last_owner');
    expect(e.fields).toEqual({});
    expect(e.hasFieldErrors).toBe(false);
  });

  it('falls back to a plain sentence when the body is not the error shape', () => {
    expect(toApiError(502, '<html>bad gateway</html>')).toMatchObject({ status: 502, code: 'internal', message: 'Request failed (502).' });
    expect(toApiError(429, undefined)).toMatchObject({ code: 'bad_request', message: 'Too many attempts. Wait a moment and try again.' });
    expect(toApiError(404, { message: 'nope' })).toMatchObject({ code: 'not_found', message: 'Not found.' });
  });
});

describe('issuesToFields', () => {
  it('joins paths with dots and keeps the first message per field', () => {
    expect(
      issuesToFields([
        { path: ['email'], message: 'first' },
        { path: ['email'], message: 'second' },
        { path: ['cells', 0, 'source'], message: 'deep' },
        { path: [], message: 'whole' },
      ]),
    ).toEqual({ email: 'first', 'cells.0.source': 'deep', '': 'whole' });
  });
});

describe('apiFetch', () => {
  it('sends JSON with same-origin credentials and returns the parsed answer', async () => {
    const { fn, seen } = mockFetch({ 'POST /api/x': { status: 201, body: { ok: true } } });
    await expect(apiFetch('/api/x', { method: 'POST', body: { a: 1 }, query: { q: 'z', skip: undefined } })).resolves.toEqual({
      ok: true,
    });
    // undefined query values are left out
    expect(seen[0].url).toBe('/api/x?q=z');
    const init = fn.mock.calls[0][1]!;
    expect(init.credentials).toBe('same-origin');
    expect((init.headers as Record<string, string>)['Content-Type']).toBe('application/json');
    expect(seen[0].body).toEqual({ a: 1 });
  });

  it('resolves undefined on 204 and throws ApiError with fields on 4xx', async () => {
    mockFetch({
      'DELETE /api/thing': { status: 204 },
      'POST /api/thing': { status: 409, body: { error: { code: 'conflict', message: 'Taken', fields: { name: 'Already used' } } } },
    });
    await expect(apiFetch('/api/thing', { method: 'DELETE' })).resolves.toBeUndefined();
    const err = await apiFetch('/api/thing', { method: 'POST', body: {} }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect(err).toMatchObject({ status: 409, code: 'conflict', message: 'Taken', fields: { name: 'Already used' } });
  });

  it('turns a network failure into status 0, code network', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => Promise.reject(new TypeError('Failed to fetch'))));
    await expect(apiFetch('/api/x')).rejects.toMatchObject({ status: 0, code: 'network' });
  });
});

describe('callRoute', () => {
  it('validates the body with the shared schema before sending anything', async () => {
    const { fn } = mockFetch({});
    const err = await callRoute('signUp', { body: { email: 'not-an-address', password: 'short', name: '' } }).catch((e: unknown) => e);
    expect(fn).not.toHaveBeenCalled();
    expect(err).toBeInstanceOf(ApiError);
    const e = err as ApiError;
    expect(e.code).toBe('bad_request');
    // messages come from shared/api/common.ts
    expect(e.field('email')).toBe('Not a valid e-mail address');
    expect(e.field('password')).toBe('At least 10 characters');
    expect(e.field('name')).toBe('Required');
  });

  it('fills path parameters, sends the normalised body, and parses the answer', async () => {
    const { seen } = mockFetch({
      'PATCH /api/workspaces/w1/members/u2': {
        status: 200,
        body: { member: { userId: 'u2', email: 'bo@example.test', name: 'Bo', role: 'reviewer', joinedAt: ISO } },
      },
    });
    const res = await callRoute('changeRole', { params: { workspaceId: 'w1', userId: 'u2' }, body: { role: 'reviewer' } });
    expect(res.member.role).toBe('reviewer');
    expect(seen[0]).toMatchObject({ method: 'PATCH', url: '/api/workspaces/w1/members/u2', body: { role: 'reviewer' } });
  });

  it('trims and lower-cases the e-mail the way the server would', async () => {
    const { seen } = mockFetch({ 'POST /api/auth/password-reset/request': { status: 202, body: { ok: true } } });
    await callRoute('requestPasswordReset', { body: { email: '  Ana@Example.TEST ' } });
    expect(seen[0].body).toEqual({ email: 'ana@example.test' });
  });

  it('rejects an answer that does not match the response schema', async () => {
    mockFetch({ 'GET /api/workspaces': { status: 200, body: { workspaces: [{ id: 'w1' }] } } });
    await expect(callRoute('listWorkspaces')).rejects.toMatchObject({ code: 'bad_response' });
  });
});
