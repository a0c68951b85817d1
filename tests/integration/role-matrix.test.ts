/**
 * The role matrix: every API route × every kind of caller, with the status each must get.
 * The routes are enumerated from the running Express app, so a route added without a row here
 * fails this test (and a row whose route disappeared fails too).
 *
 * Callers: owner, editor, reviewer, viewer (members of the workspace in the path), nonMember
 * (signed in, not a member), anonymous (no session), shareHolder (no session, but holds a valid
 * share-link token for the notebook and sends it along as a bearer token and header).
 *
 * Every cell runs against a fresh set of rows (workspace with all roles + a second owner + a
 * removable member, a notebook with a cell, a share link, an invitation addressed to the caller,
 * a reset token, a pending sign-up) and a fresh session, so destructive routes do not disturb other cells.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { routes, routePath, type RouteName } from '../../shared/api/routes';
import { apiErrorSchema, type Role } from '../../shared/api/common';
import { createLucia } from '../../server/auth/lucia';
import { cells, invitations, memberships, notebooks, passwordResets, pendingSignUps, shareLinks, workspaces } from '../../server/db/schema';
import { hashPassword } from '../../server/auth/password';
import { hashToken, newId, newToken } from '../../server/lib/ids';
import { startApiServer, type TestServer } from '../helpers/server';
import { TEST_PASSWORD, TestClient, signUp, uniqueEmail } from '../helpers/http';
import { csvForm, notebookMatrixWorld, type NotebookMatrixWorld } from './notebook/matrix-world';

const CALLERS = ['owner', 'editor', 'reviewer', 'viewer', 'nonMember', 'anonymous', 'shareHolder'] as const;
type Caller = (typeof CALLERS)[number];
type Row = Record<Caller, number>;
const row = (...s: number[]): Row => Object.fromEntries(CALLERS.map((c, i) => [c, s[i]])) as Row;

//                                  owner editor reviewer viewer nonMember anonymous shareHolder
const ALL_200 = row(200, 200, 200, 200, 200, 200, 200);
const SIGNED_IN = (ok: number) => row(ok, ok, ok, ok, ok, 401, 401);
const VIEWER_UP = (ok: number) => row(ok, ok, ok, ok, 404, 401, 401);
const EDITOR_UP = (ok: number) => row(ok, ok, 403, 403, 404, 401, 401);
const OWNER_ONLY = (ok: number) => row(ok, 403, 403, 403, 404, 401, 401);
const REVIEWER_UP = (ok: number) => row(ok, ok, ok, 403, 404, 401, 401);

const EXPECTED: Record<RouteName, Row> = {
  health: ALL_200,
  signUp: row(202, 202, 202, 202, 202, 202, 202),
  confirmSignUp: ALL_200,
  signIn: ALL_200,
  signOut: row(204, 204, 204, 204, 204, 204, 204),
  me: SIGNED_IN(200),
  requestPasswordReset: row(202, 202, 202, 202, 202, 202, 202),
  confirmPasswordReset: row(204, 204, 204, 204, 204, 204, 204),
  listWorkspaces: SIGNED_IN(200),
  createWorkspace: SIGNED_IN(201),
  getWorkspace: VIEWER_UP(200),
  renameWorkspace: OWNER_ONLY(200),
  deleteWorkspace: OWNER_ONLY(204),
  listAudit: OWNER_ONLY(200),
  listMembers: VIEWER_UP(200),
  changeRole: OWNER_ONLY(200),
  removeMember: OWNER_ONLY(204),
  leaveWorkspace: VIEWER_UP(204),
  listInvitations: OWNER_ONLY(200),
  createInvitation: OWNER_ONLY(201),
  revokeInvitation: OWNER_ONLY(204),
  // Invitations are addressed to the caller in each cell; members keep their role on accepting.
  previewInvitation: SIGNED_IN(200),
  acceptInvitation: SIGNED_IN(200),
  listNotebooks: VIEWER_UP(200),
  createNotebook: EDITOR_UP(201),
  getNotebook: VIEWER_UP(200),
  getNotebookPage: VIEWER_UP(200),
  notebookEvents: VIEWER_UP(200),
  renameNotebook: EDITOR_UP(200),
  deleteNotebook: EDITOR_UP(204),
  listShareLinks: EDITOR_UP(200),
  createShareLink: EDITOR_UP(201),
  revokeShareLink: EDITOR_UP(204),
  listWorkspaceShareLinks: OWNER_ONLY(200),
  // The link is a bearer capability: whoever holds the token reads, session or not.
  getSharedNotebook: ALL_200,
  // ---- the notebook ----
  createCell: EDITOR_UP(201),
  saveCell: EDITOR_UP(200),
  moveCell: EDITOR_UP(200),
  collapseCell: EDITOR_UP(200),
  deleteCell: EDITOR_UP(204),
  uploadDataset: EDITOR_UP(201),
  getDataset: VIEWER_UP(200),
  getDatasetRows: VIEWER_UP(200),
  compileModel: VIEWER_UP(200),
  createRun: EDITOR_UP(201),
  listCellRuns: VIEWER_UP(200),
  getRun: VIEWER_UP(200),
  cancelRun: EDITOR_UP(200),
  queueCompareRun: EDITOR_UP(201),
  listCompareRuns: VIEWER_UP(200),
  cancelCompareRun: EDITOR_UP(200),
  getRunDraws: VIEWER_UP(200),
  exportRunDraws: VIEWER_UP(200),
  exportRunSummary: VIEWER_UP(200),
  listComments: VIEWER_UP(200),
  commentCounts: VIEWER_UP(200),
  createComment: REVIEWER_UP(201),
  resolveComment: REVIEWER_UP(200),
  exportNotebook: VIEWER_UP(200),
  importNotebook: EDITOR_UP(201),
  // Share-link reads are bearer capabilities like getSharedNotebook: the token is in the path.
  sharedModelCheck: ALL_200,
  sharedNotebookEvents: ALL_200,
  sharedCellRuns: ALL_200,
  sharedCompareRuns: ALL_200,
  sharedRunDraws: ALL_200,
  sharedDataset: ALL_200,
  sharedDatasetRows: ALL_200,
  // Development routes exist outside production only (404 there: see the last tests). Captured mail
  // needs the per-start key; a signed-in account without it reads only its own mail.
  devMail: row(200, 200, 200, 200, 200, 403, 403),
};

interface World {
  ws: string;
  nb: string;
  linkId: string;
  shareToken: string;
  invitationId: string;
  invitationToken: string;
  resetToken: string;
  signUpToken: string;
  targetId: string;
  nbw: NotebookMatrixWorld;
}

type Req = { params?: Record<string, string>; query?: string; body?: unknown; form?: () => FormData };
const REQUESTS: Record<RouteName, (w: World) => Req> = {
  health: () => ({}),
  signUp: () => ({ body: { email: uniqueEmail('matrix'), password: TEST_PASSWORD, name: 'Matrix' } }),
  confirmSignUp: (w) => ({ body: { token: w.signUpToken } }),
  signIn: () => ({ body: { email: people.signinUser.email, password: TEST_PASSWORD } }),
  signOut: () => ({ body: {} }),
  me: () => ({}),
  requestPasswordReset: () => ({ body: { email: people.resetUser.email } }),
  confirmPasswordReset: (w) => ({ body: { token: w.resetToken, password: TEST_PASSWORD } }),
  listWorkspaces: () => ({}),
  createWorkspace: () => ({ body: { name: 'Matrix workspace' } }),
  getWorkspace: (w) => ({ params: { workspaceId: w.ws } }),
  renameWorkspace: (w) => ({ params: { workspaceId: w.ws }, body: { name: 'Renamed' } }),
  deleteWorkspace: (w) => ({ params: { workspaceId: w.ws } }),
  listAudit: (w) => ({ params: { workspaceId: w.ws } }),
  listMembers: (w) => ({ params: { workspaceId: w.ws } }),
  changeRole: (w) => ({ params: { workspaceId: w.ws, userId: w.targetId }, body: { role: 'reviewer' } }),
  removeMember: (w) => ({ params: { workspaceId: w.ws, userId: w.targetId } }),
  leaveWorkspace: (w) => ({ params: { workspaceId: w.ws }, body: {} }),
  listInvitations: (w) => ({ params: { workspaceId: w.ws } }),
  createInvitation: (w) => ({ params: { workspaceId: w.ws }, body: { email: uniqueEmail('invitee'), role: 'viewer' } }),
  revokeInvitation: (w) => ({ params: { workspaceId: w.ws, invitationId: w.invitationId } }),
  previewInvitation: (w) => ({ body: { token: w.invitationToken } }),
  acceptInvitation: (w) => ({ body: { token: w.invitationToken } }),
  listNotebooks: (w) => ({ params: { workspaceId: w.ws } }),
  createNotebook: (w) => ({ params: { workspaceId: w.ws }, body: { title: 'Matrix notebook' } }),
  getNotebook: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb } }),
  getNotebookPage: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb } }),
  // The event stream answers once and closes with ?once=1.
  notebookEvents: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb }, query: 'once=1' }),
  renameNotebook: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb }, body: { title: 'Renamed notebook' } }),
  deleteNotebook: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb } }),
  listShareLinks: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb } }),
  createShareLink: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb }, body: {} }),
  revokeShareLink: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, linkId: w.linkId } }),
  getSharedNotebook: (w) => ({ params: { token: w.shareToken } }),
  listWorkspaceShareLinks: (w) => ({ params: { workspaceId: w.ws } }),
  devMail: () => ({}),
  createCell: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb }, body: { kind: 'notes', source: 'more' } }),
  saveCell: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.notesCell }, body: { baseVersion: 1, source: 'saved' } }),
  moveCell: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.notesCell }, body: { direction: 'down' } }),
  collapseCell: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.notesCell }, body: { collapsed: true } }),
  deleteCell: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.notesCell } }),
  uploadDataset: (w) => ({ params: { workspaceId: w.ws }, form: () => csvForm('x,y\n1,2\n', { name: 'pairs' }) }),
  getDataset: (w) => ({ params: { workspaceId: w.ws, datasetId: w.nbw.dataset } }),
  getDatasetRows: (w) => ({ params: { workspaceId: w.ws, datasetId: w.nbw.dataset } }),
  compileModel: (w) => ({ params: { workspaceId: w.ws }, body: { source: 'unknown a\nconstrain a >= 0' } }),
  createRun: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.fitCell }, body: {} }),
  listCellRuns: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.fitCell } }),
  getRun: (w) => ({ params: { workspaceId: w.ws, runId: w.nbw.doneRun } }),
  cancelRun: (w) => ({ params: { workspaceId: w.ws, runId: w.nbw.queuedRun }, body: {} }),
  queueCompareRun: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.compareCell }, body: {} }),
  listCompareRuns: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.compareCell } }),
  cancelCompareRun: (w) => ({ params: { workspaceId: w.ws, runId: w.nbw.queuedCompare }, body: {} }),
  getRunDraws: (w) => ({ params: { workspaceId: w.ws, runId: w.nbw.doneRun } }),
  exportRunDraws: (w) => ({ params: { workspaceId: w.ws, runId: w.nbw.doneRun } }),
  exportRunSummary: (w) => ({ params: { workspaceId: w.ws, runId: w.nbw.doneRun } }),
  listComments: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb } }),
  commentCounts: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb } }),
  createComment: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, cellId: w.nbw.notesCell }, body: { body: 'A question' } }),
  resolveComment: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb, commentId: w.nbw.comment }, body: { resolved: true } }),
  exportNotebook: (w) => ({ params: { workspaceId: w.ws, notebookId: w.nb } }),
  importNotebook: (w) => ({
    params: { workspaceId: w.ws },
    form: () => csvForm(JSON.stringify({ slackline: 1, notebook: { title: 'Imported' }, cells: [{ key: 'c1', kind: 'notes', source: 'hi' }], datasets: [] }), {}, 'nb.json'),
  }),
  sharedModelCheck: (w) => ({ params: { token: w.shareToken, cellId: w.nbw.modelCell } }),
  sharedNotebookEvents: (w) => ({ params: { token: w.shareToken }, query: 'once=1' }),
  sharedCellRuns: (w) => ({ params: { token: w.shareToken, cellId: w.nbw.fitCell } }),
  sharedCompareRuns: (w) => ({ params: { token: w.shareToken, cellId: w.nbw.compareCell } }),
  sharedRunDraws: (w) => ({ params: { token: w.shareToken, runId: w.nbw.doneRun } }),
  sharedDataset: (w) => ({ params: { token: w.shareToken, datasetId: w.nbw.dataset } }),
  sharedDatasetRows: (w) => ({ params: { token: w.shareToken, datasetId: w.nbw.dataset } }),
};

type Person = { id: string; email: string };
const people = {} as Record<'owner' | 'owner2' | 'editor' | 'reviewer' | 'viewer' | 'nonMember' | 'target' | 'signinUser' | 'resetUser', Person>;
let server: TestServer;
let lucia: ReturnType<typeof createLucia>;
let pendingPasswordHash: string;

beforeAll(async () => {
  server = await startApiServer({ config: { logErrors: true } });
  lucia = createLucia(server.db.db);
  pendingPasswordHash = await hashPassword(TEST_PASSWORD);
  for (const key of Object.keys({ owner: 1, owner2: 1, editor: 1, reviewer: 1, viewer: 1, nonMember: 1, target: 1, signinUser: 1, resetUser: 1 })) {
    const u = await signUp(server.client(), { email: uniqueEmail(key) });
    people[key as keyof typeof people] = { id: u.id, email: u.email };
  }
});
afterAll(() => server.close());

async function makeWorld(caller: Caller): Promise<World> {
  const db = server.db.db;
  const now = server.clock.now();
  const ws = newId();
  await db.insert(workspaces).values({ id: ws, name: 'Matrix world', createdBy: people.owner.id, createdAt: now, updatedAt: now });
  const roles: [keyof typeof people, Role][] = [
    ['owner', 'owner'], ['owner2', 'owner'], ['editor', 'editor'], ['reviewer', 'reviewer'], ['viewer', 'viewer'], ['target', 'viewer'],
  ];
  await db.insert(memberships).values(roles.map(([p, role]) => ({ workspaceId: ws, userId: people[p].id, role, createdAt: now })));
  const nb = newId();
  await db.insert(notebooks).values({ id: nb, workspaceId: ws, title: 'Matrix notebook', createdBy: people.owner.id, createdAt: now, updatedAt: now });
  await db.insert(cells).values({ id: newId(), workspaceId: ws, notebookId: nb, kind: 'notes', position: 0, source: 'notes', content: null });
  const shareToken = newToken();
  const linkId = newId();
  await db.insert(shareLinks).values({ id: linkId, workspaceId: ws, notebookId: nb, tokenHash: hashToken(shareToken), createdBy: people.owner.id, createdAt: now });
  const invitationToken = newToken();
  const invitationId = newId();
  const invitedEmail = caller in people ? people[caller as keyof typeof people].email : uniqueEmail('nobody');
  await db.insert(invitations).values({
    id: invitationId, workspaceId: ws, email: invitedEmail, role: 'viewer', tokenHash: hashToken(invitationToken),
    invitedBy: people.owner.id, createdAt: now, expiresAt: new Date(now.getTime() + 86_400_000),
  });
  const resetToken = newToken();
  await db.insert(passwordResets).values({
    id: newId(), userId: people.resetUser.id, tokenHash: hashToken(resetToken), createdAt: now, expiresAt: new Date(now.getTime() + 600_000),
  });
  const signUpToken = newToken();
  await db.insert(pendingSignUps).values({
    id: newId(), email: uniqueEmail('pending'), name: 'Pending', passwordHash: pendingPasswordHash,
    tokenHash: hashToken(signUpToken), createdAt: now, expiresAt: new Date(now.getTime() + 600_000),
  });
  const nbw = await notebookMatrixWorld(db, ws, nb, people.owner.id, people.reviewer.id, now);
  return { ws, nb, linkId, shareToken, invitationId, invitationToken, resetToken, signUpToken, targetId: people.target.id, nbw };
}

async function clientFor(caller: Caller, w: World): Promise<TestClient> {
  const c = new TestClient(server.url);
  if (caller === 'anonymous') return c;
  if (caller === 'shareHolder') {
    c.extraHeaders = { authorization: `Bearer ${w.shareToken}`, 'x-share-token': w.shareToken };
    return c;
  }
  // A fresh session per cell: sign-out, sign-in and reset may end it.
  const session = await lucia.createSession(people[caller].id, {});
  c.extraHeaders = { cookie: `slackline_session=${session.id}` };
  return c;
}

/** `METHOD /path` of every route the Express app has, read from its router stack. */
function enumerateAppRoutes(app: TestServer['app']): string[] {
  const found: string[] = [];
  const walk = (stack: any[]) => {
    for (const layer of stack) {
      if (layer.route) {
        for (const m of Object.keys(layer.route.methods)) found.push(`${m.toUpperCase()} ${layer.route.path}`);
      } else if (layer.handle?.stack) {
        walk(layer.handle.stack);
      }
    }
  };
  walk((app as any).router.stack);
  return found.filter((r) => r.split(' ')[1].startsWith('/api/'));
}

describe('role matrix', () => {
  it('has exactly one row for every route the app serves', () => {
    const served = enumerateAppRoutes(server.app).sort();
    const inMatrix = (Object.keys(EXPECTED) as RouteName[]).map((n) => `${routes[n].method} ${routes[n].path}`).sort();
    expect(served.length).toBeGreaterThan(20);
    expect(new Set(served).size).toBe(served.length);
    expect(served).toEqual(inMatrix);
  });

  for (const name of Object.keys(EXPECTED) as RouteName[]) {
    const def = routes[name];
    it(`${def.method} ${def.path}`, async () => {
      const actual = {} as Row;
      for (const caller of CALLERS) {
        const w = await makeWorld(caller);
        const req = REQUESTS[name](w);
        const c = await clientFor(caller, w);
        const res = req.form
          ? await c.raw(routePath(name, req.params), { method: def.method, body: req.form() })
          : await c.request(def.method, routePath(name, req.params) + (req.query ? `?${req.query}` : ''), req.body);
        actual[caller] = res.status;
        if (res.status >= 400) expect(apiErrorSchema.safeParse(res.body).success, `${caller}: ${res.text}`).toBe(true);
        else if (res.status !== 204 && 'response' in def) expect(def.response.safeParse(res.body).success).toBe(true);
      }
      expect(actual).toEqual(EXPECTED[name]);
    });
  }

  it('opens captured mail to anyone holding this start\'s key, and to nobody with another', async () => {
    const anon = new TestClient(server.url);
    expect((await anon.get(`/api/dev/mail?key=${server.config.devMailKey}`)).status).toBe(200);
    expect((await new TestClient(server.url).get(`/api/dev/mail?key=${'k'.repeat(32)}`)).status).toBe(403);
  });

  it('hides development routes in production', async () => {
    const prod = await startApiServer({ config: { production: true } });
    try {
      const res = await prod.client().get('/api/dev/mail');
      expect(res.status).toBe(404);
      expect(res.body.error.code).toBe('not_found');
    } finally {
      await prod.close();
    }
  });
});
