// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen } from '@testing-library/react';
import InviteRoute from '@/routes/invite';
import { ISO, mockFetch, renderWithProviders } from './test-utils';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const TOKEN = 'tok_abcdefghijklmnop1234';
const me = { status: 200, body: { user: { id: 'u2', email: 'bo@orchard.test', name: 'Bo', createdAt: ISO } } };
const preview = (emailMatches: boolean) => ({
  status: 200,
  body: {
    invitation: {
      workspaceName: 'Orchard irrigation trial',
      role: 'reviewer',
      email: 'bo@orchard.test',
      invitedByName: 'Ana Okafor',
      expiresAt: '2026-12-09T00:00:00.000Z',
      emailMatches,
    },
  },
});
const at = { path: `/invite/${TOKEN}`, pattern: '/invite/:token' };

describe('invitation page', () => {
  it('asks a signed-out visitor to sign in or sign up, and to come back here', async () => {
    mockFetch({ 'GET /api/auth/me': { status: 401, body: { error: { code: 'unauthenticated', message: 'Please sign in.' } } } });
    renderWithProviders(<InviteRoute />, at);
    const signIn = await screen.findByRole('link', { name: 'Sign in to accept' });
    expect(signIn.getAttribute('href')).toBe(`/sign-in?next=${encodeURIComponent(`/invite/${TOKEN}`)}`);
    expect(screen.getByRole('link', { name: 'Create an account' }).getAttribute('href')).toBe(
      `/sign-up?next=${encodeURIComponent(`/invite/${TOKEN}`)}`,
    );
  });

  it('shows what is granted and accepts with the token from the link', async () => {
    const { seen } = mockFetch({
      'GET /api/auth/me': me,
      'POST /api/invitations/preview': preview(true),
      'POST /api/invitations/accept': {
        status: 200,
        body: { workspace: { id: 'w1', name: 'Orchard irrigation trial', role: 'reviewer', createdAt: ISO } },
      },
    });
    renderWithProviders(<InviteRoute />, { ...at, routes: [{ path: '/w/:id', element: <p>workspace page</p> }] });
    expect(await screen.findByText('Reviewer')).toBeTruthy();
    expect(screen.getByText('Ana Okafor')).toBeTruthy();
    fireEvent.click(screen.getByRole('button', { name: 'Join Orchard irrigation trial' }));
    expect(await screen.findByText('workspace page')).toBeTruthy();
    // one preview, one accept — the used-up token is not asked about again
    expect(seen.filter((r) => r.method === 'POST').map((r) => `${r.url} ${JSON.stringify(r.body)}`)).toEqual([
      `/api/invitations/preview {"token":"${TOKEN}"}`,
      `/api/invitations/accept {"token":"${TOKEN}"}`,
    ]);
  });

  it('offers to switch account when signed in with another address, and no Join button', async () => {
    mockFetch({ 'GET /api/auth/me': me, 'POST /api/invitations/preview': preview(false) });
    renderWithProviders(<InviteRoute />, at);
    expect(await screen.findByText('Signed in with a different address')).toBeTruthy();
    expect(screen.getByRole('button', { name: 'Switch account' })).toBeTruthy();
    expect(screen.queryByRole('button', { name: /^Join/ })).toBeNull();
  });

  it('says plainly when the link is used, revoked or expired', async () => {
    mockFetch({
      'GET /api/auth/me': me,
      'POST /api/invitations/preview': { status: 400, body: { error: { code: 'invalid_token', message: 'Invitation not valid' } } },
    });
    renderWithProviders(<InviteRoute />, at);
    expect(await screen.findByText('This invitation cannot be used')).toBeTruthy();
  });
});
