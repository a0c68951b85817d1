// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen } from '@testing-library/react';
import ConfirmSignUpRoute from '@/routes/confirm-sign-up';
import { ISO, mockFetch, renderWithProviders } from './test-utils';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const TOKEN = 'tok_abcdefghijklmnop1234';
const NEXT = '/invite/inv_abcdefghijklmnop';
const at = (search: string) => ({ path: `/confirm-sign-up${search}`, pattern: '/confirm-sign-up' });

describe('confirm sign-up page', () => {
  it('creates nothing on opening; the button creates the account and goes on to next', async () => {
    const { seen } = mockFetch({
      'POST /api/auth/confirm-sign-up': { status: 200, body: { user: { id: 'u1', email: 'bo@orchard.test', name: 'Bo', createdAt: ISO } } },
    });
    renderWithProviders(<ConfirmSignUpRoute />, {
      ...at(`?token=${TOKEN}&next=${encodeURIComponent(NEXT)}`),
      routes: [{ path: '/invite/:token', element: <p>invitation page</p> }],
    });
    const button = await screen.findByRole('button', { name: 'Create my account' });
    expect(seen.filter((r) => r.method === 'POST')).toEqual([]);
    fireEvent.click(button);
    expect(await screen.findByText('invitation page')).toBeTruthy();
    expect(seen.filter((r) => r.method === 'POST').map((r) => `${r.url} ${JSON.stringify(r.body)}`)).toEqual([
      `/api/auth/confirm-sign-up {"token":"${TOKEN}"}`,
    ]);
  });

  it('says clearly that a used or expired link no longer works, and offers a new sign-up', async () => {
    mockFetch({
      'POST /api/auth/confirm-sign-up': {
        status: 400,
        body: { error: { code: 'invalid_token', message: 'This confirmation link is unknown, already used or expired', fields: { token: 'Invalid or expired' } } },
      },
    });
    renderWithProviders(<ConfirmSignUpRoute />, at(`?token=${TOKEN}&next=${encodeURIComponent(NEXT)}`));
    fireEvent.click(await screen.findByRole('button', { name: 'Create my account' }));
    expect(await screen.findByText('This confirmation link no longer works')).toBeTruthy();
    expect(screen.getByRole('link', { name: 'Sign up again' }).getAttribute('href')).toBe(`/sign-up?next=${encodeURIComponent(NEXT)}`);
    expect(screen.queryByRole('button', { name: 'Create my account' })).toBeNull();
  });

  it('ignores a next that leaves the site', async () => {
    mockFetch({
      'POST /api/auth/confirm-sign-up': { status: 200, body: { user: { id: 'u1', email: 'bo@orchard.test', name: 'Bo', createdAt: ISO } } },
    });
    renderWithProviders(<ConfirmSignUpRoute />, {
      ...at(`?token=${TOKEN}&next=${encodeURIComponent('//evil.example/x')}`),
      routes: [{ path: '/', element: <p>home page</p> }],
    });
    fireEvent.click(await screen.findByRole('button', { name: 'Create my account' }));
    expect(await screen.findByText('home page')).toBeTruthy();
  });
});
