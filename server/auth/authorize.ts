/**
 * The one authorization middleware. Every API route passes through it with the access level of
 * its entry in the shared route table:
 *  - 'public'       anyone
 *  - 'dev'          outside production only (404 in production); the route itself asks for the
 *                   per-start key or a session (server/routes/system.ts)
 *  - 'signed-in'    a valid session (401 otherwise)
 *  - a role         a session (401) AND membership of :workspaceId (404 for non-members, so a
 *                   workspace's existence is not revealed) with at least that role (403)
 *  - 'share-token'  :token names an active share link (404 when unknown, revoked or expired);
 *                   grants read access to that one notebook and nothing else
 */
import type { RequestHandler } from 'express';
import { and, eq } from 'drizzle-orm';
import { roleAtLeast, type Role } from '../../shared/api/common';
import type { Access } from '../../shared/api/routes';
import type { AppContext } from '../context';
import { memberships, shareLinks, workspaces } from '../db/schema';
import { HttpError, forbidden, notFound, unauthenticated } from '../http/errors';
import { hashToken } from '../lib/ids';
import { ROLES } from '../../shared/terms';

export interface WorkspaceGrant {
  id: string;
  name: string;
  role: Role;
  createdAt: Date;
}
export interface ShareGrant {
  linkId: string;
  workspaceId: string;
  notebookId: string;
  expiresAt: Date | null;
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** Set by the session middleware when a valid session cookie came with the request. */
      user?: { id: string; email: string; name: string; createdAt: Date };
      sessionId?: string;
      /** Set by authorize() for role-protected routes. */
      workspace?: WorkspaceGrant;
      /** Set by authorize() for share-token routes. */
      share?: ShareGrant;
    }
  }
}

const ROLE_ACCESS = new Set<Access>(ROLES);

export function authorize(ctx: AppContext, access: Access): RequestHandler {
  return async (req, _res, next) => {
    try {
      if (access === 'public') return next();
      if (access === 'dev') {
        if (ctx.config.production) throw notFound('No such route');
        return next();
      }
      if (access === 'share-token') {
        const token = String(req.params.token ?? '');
        const [link] = await ctx.db
          .select()
          .from(shareLinks)
          .where(eq(shareLinks.tokenHash, hashToken(token)))
          .limit(1);
        const now = ctx.clock.now();
        if (!link || link.revokedAt || (link.expiresAt && link.expiresAt <= now)) {
          throw notFound('This link does not exist, was revoked or has expired');
        }
        req.share = { linkId: link.id, workspaceId: link.workspaceId, notebookId: link.notebookId, expiresAt: link.expiresAt };
        return next();
      }
      if (!req.user) throw unauthenticated();
      if (access === 'signed-in') return next();
      if (!ROLE_ACCESS.has(access)) throw new HttpError(500, 'internal', `unknown access level ${access}`);

      const workspaceId = String(req.params.workspaceId ?? '');
      const [row] = await ctx.db
        .select({ id: workspaces.id, name: workspaces.name, createdAt: workspaces.createdAt, role: memberships.role })
        .from(memberships)
        .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
        .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, req.user.id)))
        .limit(1);
      if (!row) throw notFound('Workspace not found');
      if (!roleAtLeast(row.role, access as Role)) {
        throw forbidden(`This needs the ${access} role or higher (yours: ${row.role})`);
      }
      req.workspace = row;
      next();
    } catch (err) {
      next(err);
    }
  };
}
