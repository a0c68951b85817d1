// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen, waitFor } from '@testing-library/react';
import { SignUpForm } from '@/features/auth/components/sign-up-form';
import { SignInForm } from '@/features/auth/components/sign-in-form';
import { ResetPasswordForm } from '@/features/auth/components/reset-password-form';
import { InviteForm } from '@/features/members/components/invite-form';
import { ISO, mockFetch, renderWithProviders } from './test-utils';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

function fill(label: RegExp | string, value: string) {
  fireEvent.change(screen.getByLabelText(label), { target: { value } });
}

describe('sign-up form', () => {
  it('shows the shared schema messages under each field without calling the server', async () => {
    const { fn } = mockFetch({});
    renderWithProviders(<SignUpForm />);
    fill('E-mail', 'ana-at-example');
    fill('Password', 'short');
    fireEvent.click(screen.getByRole('button', { name: 'Create account' }));

    expect(await screen.findByText('Not a valid e-mail address')).toBeTruthy();
    expect(screen.getByText('At least 10 characters')).toBeTruthy();
    expect(screen.getByText('Required')).toBeTruthy(); // the empty name
    expect(screen.getByLabelText('E-mail').getAttribute('aria-invalid')).toBe('true');
    expect(fn).not.toHaveBeenCalled();

  });

  it('moves the focus to the first field that needs fixing', async () => {
    mockFetch({});
    renderWithProviders(<SignUpForm />);
    fill('Your name', 'Ana');
    fill('E-mail', 'ana-at-example');
    fill('Password', 'long enough password');
    fireEvent.click(screen.getByRole('button', { name: 'Create account' }));
    await screen.findByText('Not a valid e-mail address');
    await waitFor(() => expect(document.activeElement).toBe(screen.getByLabelText('E-mail')));
  });

  it('puts a server field error under its field and clears it when the field is edited', async () => {
    const { seen } = mockFetch({
      'POST /api/auth/sign-up': {
        status: 400,
        body: { error: { code: 'bad_request', message: 'Check the highlighted fields', fields: { password: 'Too common a password' } } },
      },
    });
    renderWithProviders(<SignUpForm />);
    fill('Your name', 'Ana Ribeiro');
    fill('E-mail', 'ana@example.test');
    fill('Password', 'long enough password');
    fireEvent.click(screen.getByRole('button', { name: 'Create account' }));

    const msg = await screen.findByText('Too common a password');
    const input = screen.getByLabelText('Password');
    expect(input.getAttribute('aria-describedby')).toContain(msg.parentElement!.id);
    expect(seen[0].body).toEqual({ name: 'Ana Ribeiro', email: 'ana@example.test', password: 'long enough password' });
    // the message belongs to a field the form has, so there is no extra banner
    expect(screen.queryByRole('alert')).toBeNull();

    fill('Password', 'another long enough password');
    await waitFor(() => expect(screen.queryByText('Too common a password')).toBeNull());
  });

  it('ends on "check your mail" and sends the page to open afterwards along', async () => {
    const { seen } = mockFetch({
      'POST /api/auth/sign-up': { status: 202, body: { ok: true, message: 'Check your mail to finish creating your account' } },
    });
    renderWithProviders(<SignUpForm next="/invite/abc" />);
    fill('Your name', 'Ana');
    fill('E-mail', 'ana@example.test');
    fill('Password', 'long enough password');
    fireEvent.click(screen.getByRole('button', { name: 'Create account' }));
    expect(await screen.findByText('Check your mail')).toBeTruthy();
    expect(screen.getByText('ana@example.test')).toBeTruthy();
    expect(seen[0].body).toEqual({ name: 'Ana', email: 'ana@example.test', password: 'long enough password', next: '/invite/abc' });
    expect(screen.queryByRole('button', { name: 'Create account' })).toBeNull();
  });
});

describe('sign-in form', () => {
  it('shows a failure without field names as a message above the form', async () => {
    mockFetch({
      'POST /api/auth/sign-in': { status: 401, body: { error: { code: 'invalid_credentials', message: 'E-mail or password is wrong' } } },
    });
    renderWithProviders(<SignInForm onSuccess={() => {}} />);
    fill('E-mail', 'ana@example.test');
    fill('Password', 'wrong one');
    fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    const alert = await screen.findByRole('alert');
    expect(alert.textContent).toContain('E-mail or password is wrong');
  });

  it('explains a rate limit', async () => {
    mockFetch({ 'POST /api/auth/sign-in': { status: 429, body: { error: { code: 'rate_limited', message: 'Too many attempts, try again in a minute' } } } });
    renderWithProviders(<SignInForm onSuccess={() => {}} />);
    fill('E-mail', 'ana@example.test');
    fill('Password', 'whatever');
    fireEvent.click(screen.getByRole('button', { name: 'Sign in' }));
    expect((await screen.findByRole('alert')).textContent).toContain('Too many attempts');
  });
});

describe('reset-password form', () => {
  it('checks the repeated password locally and sends only token and password', async () => {
    const { seen } = mockFetch({ 'POST /api/auth/password-reset/confirm': { status: 204 } });
    const token = 'abcdefghijklmnopqrstuvwx';
    renderWithProviders(<ResetPasswordForm token={token} />);
    fill('New password', 'a brand new secret');
    fill('Repeat new password', 'a brand new secreT');
    fireEvent.click(screen.getByRole('button', { name: 'Set new password' }));
    expect(await screen.findByText('The two passwords differ')).toBeTruthy();
    expect(seen).toHaveLength(0);

    fill('Repeat new password', 'a brand new secret');
    fireEvent.click(screen.getByRole('button', { name: 'Set new password' }));
    expect(await screen.findByText('Password changed')).toBeTruthy();
    expect(seen[0].body).toEqual({ token, password: 'a brand new secret' });
  });

  it('recognises a used or expired token', async () => {
    mockFetch({
      'POST /api/auth/password-reset/confirm': { status: 400, body: { error: { code: 'invalid_token', message: 'The link is no longer valid' } } },
    });
    renderWithProviders(<ResetPasswordForm token="abcdefghijklmnopqrstuvwx" />);
    fill('New password', 'a brand new secret');
    fill('Repeat new password', 'a brand new secret');
    fireEvent.click(screen.getByRole('button', { name: 'Set new password' }));
    expect(await screen.findByText('This reset link no longer works')).toBeTruthy();
  });
});

describe('invite form', () => {
  it('offers only roles an invitation can grant and reports a bad address from the server', async () => {
    const { seen } = mockFetch({
      'POST /api/workspaces/w1/invitations': {
        status: 409,
        body: { error: { code: 'conflict', message: 'Already a member', fields: { email: 'bo@example.test is already a member' } } },
      },
    });
    renderWithProviders(<InviteForm workspaceId="w1" />);
    const options = Array.from((screen.getByLabelText('Role') as HTMLSelectElement).options).map((o) => o.value);
    expect(options).toEqual(['editor', 'reviewer', 'viewer']);

    fill('E-mail address', 'bo@example.test');
    fireEvent.change(screen.getByLabelText('Role'), { target: { value: 'reviewer' } });
    fireEvent.click(screen.getByRole('button', { name: 'Send invitation' }));
    expect(await screen.findByText('bo@example.test is already a member')).toBeTruthy();
    expect(seen[0].body).toEqual({ email: 'bo@example.test', role: 'reviewer' });
  });
});
