// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen, waitFor, within } from '@testing-library/react';
import type { Member, Notebook, Role } from '@shared/api';
import { MemberTable } from '@/features/members/components/member-table';
import { isLastOwner } from '@/features/members/components/last-owner';
import { NotebookList } from '@/features/notebook/components/notebook-list';
import WorkspaceLayout from '@/routes/workspace-layout';
import NotebookRoute from '@/routes/notebook';
import { ISO, mockFetch, renderWithProviders } from './test-utils';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

const member = (userId: string, name: string, role: Role): Member => ({
  userId,
  name,
  email: `${name.toLowerCase()}@example.test`,
  role,
  joinedAt: ISO,
});

describe('isLastOwner', () => {
  it('is true only for the single owner', () => {
    const ana = member('u1', 'Ana', 'owner');
    const bo = member('u2', 'Bo', 'editor');
    expect(isLastOwner(ana, [ana, bo])).toBe(true);
    expect(isLastOwner(bo, [ana, bo])).toBe(false);
    const cy = member('u3', 'Cy', 'owner');
    expect(isLastOwner(ana, [ana, bo, cy])).toBe(false);
  });
});

describe('member table', () => {
  const members = [member('u1', 'Ana', 'owner'), member('u2', 'Bo', 'editor'), member('u3', 'Cy', 'viewer')];

  it('shows roles as plain labels to non-owners: no pickers, no Remove', () => {
    mockFetch({});
    renderWithProviders(<MemberTable workspaceId="w1" members={members} currentUserId="u2" canManage={false} />);
    expect(screen.queryAllByRole('combobox')).toHaveLength(0);
    expect(screen.queryByRole('button', { name: 'Remove' })).toBeNull();
    expect(screen.getByText('Owner')).toBeTruthy();
    expect(screen.getByText('(you)')).toBeTruthy();
  });

  it('gives owners a picker per member, but locks the only owner and says why', () => {
    mockFetch({});
    renderWithProviders(<MemberTable workspaceId="w1" members={members} currentUserId="u1" canManage />);
    const anaRow = screen.getByTestId('member-ana@example.test');
    const boRow = screen.getByTestId('member-bo@example.test');
    expect((within(anaRow).getByRole('combobox') as HTMLSelectElement).disabled).toBe(true);
    expect((within(anaRow).getByRole('button', { name: 'Remove' }) as HTMLButtonElement).disabled).toBe(true);
    expect(within(anaRow).getByText('Only owner — cannot step down')).toBeTruthy();
    expect((within(boRow).getByRole('combobox') as HTMLSelectElement).disabled).toBe(false);
    expect((within(boRow).getByRole('button', { name: 'Remove' }) as HTMLButtonElement).disabled).toBe(false);
  });

  it('surfaces the server’s last-owner refusal as a clear message', async () => {
    // two owners on screen, but the server knows one of them was just demoted elsewhere
    const twoOwners = [member('u1', 'Ana', 'owner'), member('u2', 'Bo', 'owner')];
    const { seen } = mockFetch({
      'PATCH /api/workspaces/w1/members/u1': {
        status: 409,
        body: { error: { code: 'last_owner', message: 'The last owner cannot be demoted.' } },
      },
    });
    renderWithProviders(<MemberTable workspaceId="w1" members={twoOwners} currentUserId="u1" canManage />);
    const anaRow = screen.getByTestId('member-ana@example.test');
    fireEvent.change(within(anaRow).getByRole('combobox'), { target: { value: 'viewer' } });
    const alert = await screen.findByRole('alert');
    expect(alert.textContent).toContain('A workspace always keeps at least one owner');
    expect(alert.textContent).toContain('The last owner cannot be demoted.');
    expect(seen[0].body).toEqual({ role: 'viewer' });
  });
});

describe('notebook list', () => {
  const notebooks: Notebook[] = [{ id: 'n1', workspaceId: 'w1', title: 'Sediment load by reach', createdAt: ISO, updatedAt: ISO }];

  it('offers Rename and Delete to editors only', () => {
    mockFetch({});
    const { unmount } = renderWithProviders(<NotebookList notebooks={notebooks} canEdit={false} />);
    expect(screen.getByRole('link', { name: 'Sediment load by reach' }).getAttribute('href')).toBe('/w/w1/n/n1');
    expect(screen.queryByRole('button', { name: /Rename/ })).toBeNull();
    expect(screen.queryByRole('button', { name: /Delete/ })).toBeNull();
    unmount();
    renderWithProviders(<NotebookList notebooks={notebooks} canEdit />);
    expect(screen.getByRole('button', { name: 'Rename Sediment load by reach' })).toBeTruthy();
    expect(screen.getByRole('button', { name: 'Delete Sediment load by reach' })).toBeTruthy();
  });
});

describe('workspace page', () => {
  const answer = (role: Role) => ({
    'GET /api/workspaces/w1': { status: 200, body: { workspace: { id: 'w1', name: 'River sediment', role, createdAt: ISO } } },
  });

  it('shows Rename and Delete to owners', async () => {
    mockFetch(answer('owner'));
    renderWithProviders(<WorkspaceLayout />, { path: '/w/w1', pattern: '/w/:workspaceId' });
    expect(await screen.findByRole('heading', { name: 'River sediment' })).toBeTruthy();
    expect(screen.getByRole('button', { name: 'Rename' })).toBeTruthy();
    expect(screen.getByRole('button', { name: 'Delete workspace' })).toBeTruthy();
  });

  it('hides them from editors', async () => {
    mockFetch(answer('editor'));
    renderWithProviders(<WorkspaceLayout />, { path: '/w/w1', pattern: '/w/:workspaceId' });
    expect(await screen.findByRole('heading', { name: 'River sediment' })).toBeTruthy();
    expect(screen.getByText('Editor')).toBeTruthy();
    expect(screen.queryByRole('button', { name: 'Rename' })).toBeNull();
    expect(screen.queryByRole('button', { name: 'Delete workspace' })).toBeNull();
  });

  it('enables deletion only after the name is typed', async () => {
    const { seen } = mockFetch({ ...answer('owner'), 'DELETE /api/workspaces/w1': { status: 204 }, 'GET /api/workspaces': { status: 200, body: { workspaces: [] } } });
    renderWithProviders(<WorkspaceLayout />, { path: '/w/w1', pattern: '/w/:workspaceId', routes: [{ path: '/', element: <p>home</p> }] });
    fireEvent.click(await screen.findByRole('button', { name: 'Delete workspace' }));
    const dialog = await screen.findByRole('dialog');
    const confirm = within(dialog).getByRole('button', { name: 'Delete workspace' }) as HTMLButtonElement;
    expect(confirm.disabled).toBe(true);
    fireEvent.change(within(dialog).getByLabelText('Type the workspace name to confirm'), { target: { value: 'River sediment' } });
    expect(confirm.disabled).toBe(false);
    fireEvent.click(confirm);
    expect(await screen.findByText('home')).toBeTruthy();
    expect(seen.some((r) => r.method === 'DELETE' && r.url === '/api/workspaces/w1')).toBe(true);
    // the deleted workspace is not fetched again on the way out
    expect(seen.filter((r) => r.method === 'GET' && r.url === '/api/workspaces/w1')).toHaveLength(1);
  });

  it('says plainly when the workspace is not visible', async () => {
    mockFetch({});
    renderWithProviders(<WorkspaceLayout />, { path: '/w/w9', pattern: '/w/:workspaceId' });
    expect(await screen.findByText('No such workspace')).toBeTruthy();
  });
});

describe('notebook page', () => {
  const notebookDetail = (role: Role) => ({
    notebook: { id: 'n1', workspaceId: 'w1', title: 'Coffee blend shares', createdAt: ISO, updatedAt: ISO },
    cells: [],
    role,
    workspaceName: 'Roastery',
  });
  // The screen opens with the one-request page read; the detail alone answers later refetches.
  const detail = (role: Role) => ({
    'GET /api/workspaces/w1/notebooks/n1/page': {
      status: 200,
      body: { detail: notebookDetail(role), datasets: [], modelChecks: [], cellRuns: [], comments: [] },
    },
    'GET /api/workspaces/w1/notebooks/n1': { status: 200, body: notebookDetail(role) },
  });

  it('lets editors manage share links; viewers only read', async () => {
    mockFetch(detail('viewer'));
    const first = renderWithProviders(<NotebookRoute />, { path: '/w/w1/n/n1', pattern: '/w/:workspaceId/n/:notebookId' });
    expect(await screen.findByRole('heading', { name: 'Coffee blend shares' })).toBeTruthy();
    expect(screen.getByText('This notebook has no cells yet')).toBeTruthy();
    expect(screen.queryByRole('button', { name: 'Share links' })).toBeNull();
    first.unmount();

    mockFetch({
      ...detail('editor'),
      'GET /api/workspaces/w1/notebooks/n1/share-links': { status: 200, body: { links: [] } },
    });
    renderWithProviders(<NotebookRoute />, { path: '/w/w1/n/n1', pattern: '/w/:workspaceId/n/:notebookId' });
    fireEvent.click(await screen.findByRole('button', { name: 'Share links' }));
    await waitFor(() => expect(screen.getByText('No links yet')).toBeTruthy());
  });
});
