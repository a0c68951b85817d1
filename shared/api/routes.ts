/**
 * The route table of the HTTP API: one entry per route with its method, path (Express syntax),
 * purpose, who may call it, and the zod schemas of params, query, body and response.
 * The server mounts its handlers from this table and the client builds its fetchers from it.
 *
 * Access levels:
 *  - 'public'     anyone, no session needed
 *  - 'signed-in'  any signed-in user
 *  - a Role       signed-in member of the workspace in the path with at least this role
 *                 (owner > editor > reviewer > viewer); non-members get 404 (the workspace is not revealed)
 *  - 'share-token' anyone holding a valid share-link token (read-only, that one notebook)
 *  - 'dev'        development and test only (the handler asks for the per-start key); 404 in production
 */
import { z } from 'zod';
import { okSchema, type Role } from './common';
import * as auth from './auth';
import * as ws from './workspaces';
import * as nb from './notebooks';
import * as sys from './system';
import { notebookRoutes } from './notebook-routes';

export type Access = 'public' | 'signed-in' | Role | 'share-token' | 'dev';
export type Method = 'GET' | 'POST' | 'PATCH' | 'DELETE';

export interface RouteDef {
  method: Method;
  path: string;
  purpose: string;
  access: Access;
  /** HTTP status of a successful answer; 204 has no body. */
  status: 200 | 201 | 202 | 204;
  params?: z.ZodType;
  query?: z.ZodType;
  body?: z.ZodType;
  response?: z.ZodType;
  /** Content type of a binary answer (no response schema): the client reads it with `callRouteBytes`. */
  produces?: string;
}

const empty = z.strictObject({});

export const routes = {
  health: {
    method: 'GET', path: '/api/health', access: 'public', status: 200,
    purpose: 'Liveness and database reachability (503 when the database does not answer)',
    response: sys.healthResponse,
  },

  // ---- auth ----
  signUp: {
    method: 'POST', path: '/api/auth/sign-up', access: 'public', status: 202,
    purpose: 'Ask for an account: mails a confirmation link (or, for a registered address, a notice to its owner); always the same 202, no session',
    body: auth.signUpBody, response: auth.signUpResponse,
  },
  confirmSignUp: {
    method: 'POST', path: '/api/auth/confirm-sign-up', access: 'public', status: 200,
    purpose: 'Create the account with the token from the confirmation e-mail and sign in (sets the session cookie)',
    body: auth.confirmSignUpBody, response: auth.userResponse,
  },
  signIn: {
    method: 'POST', path: '/api/auth/sign-in', access: 'public', status: 200,
    purpose: 'Sign in with e-mail and password (sets the session cookie)',
    body: auth.signInBody, response: auth.userResponse,
  },
  signOut: {
    method: 'POST', path: '/api/auth/sign-out', access: 'public', status: 204,
    purpose: 'End the current session (no-op without one)',
    body: empty,
  },
  me: {
    method: 'GET', path: '/api/auth/me', access: 'signed-in', status: 200,
    purpose: 'The signed-in user (401 when not signed in)',
    response: auth.userResponse,
  },
  requestPasswordReset: {
    method: 'POST', path: '/api/auth/password-reset/request', access: 'public', status: 202,
    purpose: 'E-mail a single-use reset link valid for one hour (always 202)',
    body: auth.passwordResetRequestBody, response: okSchema,
  },
  confirmPasswordReset: {
    method: 'POST', path: '/api/auth/password-reset/confirm', access: 'public', status: 204,
    purpose: 'Set a new password with the token from the e-mail; ends all sessions of that user',
    body: auth.passwordResetConfirmBody,
  },

  // ---- workspaces ----
  listWorkspaces: {
    method: 'GET', path: '/api/workspaces', access: 'signed-in', status: 200,
    purpose: 'Workspaces the caller belongs to, with the caller\'s role',
    response: ws.workspaceListResponse,
  },
  createWorkspace: {
    method: 'POST', path: '/api/workspaces', access: 'signed-in', status: 201,
    purpose: 'Create a workspace; the caller becomes its owner',
    body: ws.createWorkspaceBody, response: ws.workspaceResponse,
  },
  getWorkspace: {
    method: 'GET', path: '/api/workspaces/:workspaceId', access: 'viewer', status: 200,
    purpose: 'One workspace with the caller\'s role',
    params: ws.workspaceParams, response: ws.workspaceResponse,
  },
  renameWorkspace: {
    method: 'PATCH', path: '/api/workspaces/:workspaceId', access: 'owner', status: 200,
    purpose: 'Rename a workspace',
    params: ws.workspaceParams, body: ws.renameWorkspaceBody, response: ws.workspaceResponse,
  },
  deleteWorkspace: {
    method: 'DELETE', path: '/api/workspaces/:workspaceId', access: 'owner', status: 204,
    purpose: 'Delete a workspace and everything in it',
    params: ws.workspaceParams,
  },
  listAudit: {
    method: 'GET', path: '/api/workspaces/:workspaceId/audit', access: 'owner', status: 200,
    purpose: 'Audit log of role changes, share links and deletions (newest first, last 200)',
    params: ws.workspaceParams, response: ws.auditListResponse,
  },

  // ---- members ----
  listMembers: {
    method: 'GET', path: '/api/workspaces/:workspaceId/members', access: 'viewer', status: 200,
    purpose: 'Members and their roles',
    params: ws.workspaceParams, response: ws.memberListResponse,
  },
  changeRole: {
    method: 'PATCH', path: '/api/workspaces/:workspaceId/members/:userId', access: 'owner', status: 200,
    purpose: 'Change a member\'s role (the last owner cannot be demoted); below editor, their share links are revoked',
    params: ws.memberParams, body: ws.changeRoleBody, response: ws.memberResponse,
  },
  removeMember: {
    method: 'DELETE', path: '/api/workspaces/:workspaceId/members/:userId', access: 'owner', status: 204,
    purpose: 'Remove a member (the last owner cannot be removed); their share links are revoked',
    params: ws.memberParams,
  },
  leaveWorkspace: {
    method: 'POST', path: '/api/workspaces/:workspaceId/leave', access: 'viewer', status: 204,
    purpose: 'Leave the workspace (the last owner cannot leave); the leaver\'s share links are revoked',
    params: ws.workspaceParams, body: empty,
  },

  // ---- invitations ----
  listInvitations: {
    method: 'GET', path: '/api/workspaces/:workspaceId/invitations', access: 'owner', status: 200,
    purpose: 'Pending (not accepted, not revoked, not expired) invitations',
    params: ws.workspaceParams, response: ws.invitationListResponse,
  },
  createInvitation: {
    method: 'POST', path: '/api/workspaces/:workspaceId/invitations', access: 'owner', status: 201,
    purpose: 'Invite by e-mail: sends a link valid for 7 days',
    params: ws.workspaceParams, body: ws.createInvitationBody, response: ws.invitationResponse,
  },
  revokeInvitation: {
    method: 'DELETE', path: '/api/workspaces/:workspaceId/invitations/:invitationId', access: 'owner', status: 204,
    purpose: 'Revoke a pending invitation',
    params: ws.invitationParams,
  },
  previewInvitation: {
    method: 'POST', path: '/api/invitations/preview', access: 'signed-in', status: 200,
    purpose: 'Show what an invitation token grants before accepting',
    body: ws.invitationTokenBody, response: ws.invitationPreviewResponse,
  },
  acceptInvitation: {
    method: 'POST', path: '/api/invitations/accept', access: 'signed-in', status: 200,
    purpose: 'Accept an invitation; the signed-in account\'s e-mail must be the invited one',
    body: ws.invitationTokenBody, response: ws.acceptInvitationResponse,
  },

  // ---- notebooks ----
  listNotebooks: {
    method: 'GET', path: '/api/workspaces/:workspaceId/notebooks', access: 'viewer', status: 200,
    purpose: 'Notebooks of a workspace, most recently updated first',
    params: ws.workspaceParams, response: nb.notebookListResponse,
  },
  createNotebook: {
    method: 'POST', path: '/api/workspaces/:workspaceId/notebooks', access: 'editor', status: 201,
    purpose: 'Create an empty notebook',
    params: ws.workspaceParams, body: nb.createNotebookBody, response: nb.notebookResponse,
  },
  getNotebook: {
    method: 'GET', path: '/api/workspaces/:workspaceId/notebooks/:notebookId', access: 'viewer', status: 200,
    purpose: 'One notebook with its cells in order',
    params: nb.notebookParams, response: nb.notebookDetailResponse,
  },
  renameNotebook: {
    method: 'PATCH', path: '/api/workspaces/:workspaceId/notebooks/:notebookId', access: 'editor', status: 200,
    purpose: 'Rename a notebook',
    params: nb.notebookParams, body: nb.renameNotebookBody, response: nb.notebookResponse,
  },
  deleteNotebook: {
    method: 'DELETE', path: '/api/workspaces/:workspaceId/notebooks/:notebookId', access: 'editor', status: 204,
    purpose: 'Delete a notebook with its cells, runs, comments and share links',
    params: nb.notebookParams,
  },

  // ---- share links ----
  listShareLinks: {
    method: 'GET', path: '/api/workspaces/:workspaceId/notebooks/:notebookId/share-links', access: 'editor', status: 200,
    purpose: 'Share links of a notebook (active and past)',
    params: nb.notebookParams, response: nb.shareLinkListResponse,
  },
  createShareLink: {
    method: 'POST', path: '/api/workspaces/:workspaceId/notebooks/:notebookId/share-links', access: 'editor', status: 201,
    purpose: 'Create a read-only link, optionally expiring; the token is shown once',
    params: nb.notebookParams, body: nb.createShareLinkBody, response: nb.createShareLinkResponse,
  },
  revokeShareLink: {
    method: 'DELETE', path: '/api/workspaces/:workspaceId/notebooks/:notebookId/share-links/:linkId', access: 'editor', status: 204,
    purpose: 'Revoke a share link',
    params: nb.shareLinkParams,
  },
  listWorkspaceShareLinks: {
    method: 'GET', path: '/api/workspaces/:workspaceId/share-links', access: 'owner', status: 200,
    purpose: 'Every share link of the workspace (all notebooks, active and past) with its creator, for owners',
    params: ws.workspaceParams, response: nb.workspaceShareLinkListResponse,
  },
  getSharedNotebook: {
    method: 'GET', path: '/api/share/:token', access: 'share-token', status: 200,
    purpose: 'Read a shared notebook (404 when the link is unknown, revoked or expired)',
    params: nb.shareTokenParams, response: nb.sharedNotebookResponse,
  },

  // ---- the notebook: cells, datasets, model check, runs, comments, files (notebook-routes.ts) ----
  ...notebookRoutes,

  // ---- development ----
  devMail: {
    method: 'GET', path: '/api/dev/mail', access: 'dev', status: 200,
    purpose: 'Mail captured by the local fake SMTP server, newest first: all of it with the per-start key (query `key` once, then its cookie), a signed-in account\'s own mail without it, 403 otherwise; 404 in production',
    query: sys.devMailQuery, response: sys.devMailResponse,
  },
} as const satisfies Record<string, RouteDef>;

export type RouteName = keyof typeof routes;

/** Fill `:param` placeholders of a route path: `routePath('getNotebook', { workspaceId, notebookId })`. */
export function routePath(name: RouteName, params: Record<string, string> = {}): string {
  return routes[name].path.replace(/:([A-Za-z]+)/g, (_, key: string) => {
    const v = params[key];
    if (v === undefined) throw new Error(`routePath(${name}): missing param ${key}`);
    return encodeURIComponent(v);
  });
}

/** Client pages that links in e-mails and API answers point to. */
export const clientPaths = {
  share: (token: string) => `/s/${encodeURIComponent(token)}`,
  acceptInvitation: (token: string) => `/invite/${encodeURIComponent(token)}`,
  resetPassword: (token: string) => `/reset-password?token=${encodeURIComponent(token)}`,
  confirmSignUp: (token: string, next?: string) =>
    `/confirm-sign-up?token=${encodeURIComponent(token)}${next ? `&next=${encodeURIComponent(next)}` : ''}`,
} as const;
