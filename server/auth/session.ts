/** Session cookie handling: read and refresh on every request, write on sign-in, clear on sign-out. */
import type { Request, RequestHandler, Response } from 'express';
import type { AppContext } from '../context';
import { SESSION_COOKIE } from './lucia';

function cookieOptions(req: Request, expires?: Date) {
  return {
    httpOnly: true,
    sameSite: 'lax' as const,
    // Secure whenever the request came over https (directly or, with trust proxy, via a proxy).
    secure: req.secure,
    path: '/',
    ...(expires ? { expires } : {}),
  };
}

export function setSessionCookie(req: Request, res: Response, sessionId: string, expiresAt: Date): void {
  res.cookie(SESSION_COOKIE, sessionId, cookieOptions(req, expiresAt));
}

export function clearSessionCookie(req: Request, res: Response): void {
  res.clearCookie(SESSION_COOKIE, cookieOptions(req));
}

/** Resolve the caller from the session cookie (req.user, req.sessionId); never rejects by itself. */
export function sessionMiddleware(ctx: AppContext): RequestHandler {
  return async (req, res, next) => {
    try {
      const sessionId = ctx.lucia.readSessionCookie(req.headers.cookie ?? '');
      if (!sessionId) return next();
      const { session, user } = await ctx.lucia.validateSession(sessionId);
      if (!session || !user) {
        clearSessionCookie(req, res);
        return next();
      }
      if (session.fresh) setSessionCookie(req, res, session.id, session.expiresAt);
      req.user = { id: user.id, email: user.email, name: user.name, createdAt: user.createdAt };
      req.sessionId = session.id;
      next();
    } catch (err) {
      next(err);
    }
  };
}
