/** Accounts: sign up, sign in, sign out, me, password reset by e-mail. */
import { Router, type RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import { and, eq, gt, isNull } from 'drizzle-orm';
import { routes, clientPaths } from '../../shared/api/routes';
import type { User } from '../../shared/api/auth';
import type { AppContext } from '../context';
import { passwordResets, users } from '../db/schema';
import { mount } from '../http/route';
import { HttpError, conflict, unauthenticated } from '../http/errors';
import { hashPassword, verifyDummy, verifyPassword } from '../auth/password';
import { clearSessionCookie, setSessionCookie } from '../auth/session';
import { hashToken, newId, newToken } from '../lib/ids';
import { affectedRows, isDuplicateKey } from '../lib/audit';
import { passwordResetMail } from '../mail/templates';

export const RESET_TOKEN_TTL_MS = 60 * 60_000;

export const toUser = (u: { id: string; email: string; name: string; createdAt: Date }): User => ({
  id: u.id,
  email: u.email,
  name: u.name,
  createdAt: u.createdAt.toISOString(),
});

function limiter(ctx: AppContext): RequestHandler {
  return rateLimit({
    windowMs: ctx.config.authRateLimit.windowMs,
    limit: ctx.config.authRateLimit.limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) =>
      next(new HttpError(429, 'rate_limited', 'Too many attempts from your address; wait a few minutes and try again')),
  });
}

export function authRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, lucia, clock } = ctx;
  // One budget per route and client address.
  r.use(routes.signIn.path, limiter(ctx));
  r.use(routes.signUp.path, limiter(ctx));
  r.use(routes.requestPasswordReset.path, limiter(ctx));
  r.use(routes.confirmPasswordReset.path, limiter(ctx));

  mount(r, ctx, routes.signUp, async ({ body }, req, res) => {
    const [existing] = await db.select({ id: users.id }).from(users).where(eq(users.email, body.email)).limit(1);
    if (existing) throw conflict('An account with this e-mail already exists', { email: 'Already registered' });
    const user = { id: newId(), email: body.email, name: body.name, createdAt: clock.now() };
    try {
      await db.insert(users).values({ ...user, passwordHash: await hashPassword(body.password) });
    } catch (err) {
      if (isDuplicateKey(err)) throw conflict('An account with this e-mail already exists', { email: 'Already registered' });
      throw err;
    }
    if (req.sessionId) await lucia.invalidateSession(req.sessionId);
    const session = await lucia.createSession(user.id, {});
    setSessionCookie(req, res, session.id, session.expiresAt);
    return { user: toUser(user) };
  });

  mount(r, ctx, routes.signIn, async ({ body }, req, res) => {
    const [user] = await db.select().from(users).where(eq(users.email, body.email)).limit(1);
    if (!user) {
      await verifyDummy(body.password);
      throw new HttpError(401, 'invalid_credentials', 'E-mail or password is wrong');
    }
    if (!(await verifyPassword(user.passwordHash, body.password))) {
      throw new HttpError(401, 'invalid_credentials', 'E-mail or password is wrong');
    }
    if (req.sessionId) await lucia.invalidateSession(req.sessionId);
    const session = await lucia.createSession(user.id, {});
    setSessionCookie(req, res, session.id, session.expiresAt);
    return { user: toUser(user) };
  });

  mount(r, ctx, routes.signOut, async (_v, req, res) => {
    if (req.sessionId) await lucia.invalidateSession(req.sessionId);
    clearSessionCookie(req, res);
  });

  mount(r, ctx, routes.me, async (_v, req) => {
    if (!req.user) throw unauthenticated();
    return { user: toUser(req.user) };
  });

  mount(r, ctx, routes.requestPasswordReset, async ({ body }) => {
    const [user] = await db.select().from(users).where(eq(users.email, body.email)).limit(1);
    if (user) {
      const token = newToken();
      const now = clock.now();
      await db.insert(passwordResets).values({
        id: newId(),
        userId: user.id,
        tokenHash: hashToken(token),
        expiresAt: new Date(now.getTime() + RESET_TOKEN_TTL_MS),
        createdAt: now,
      });
      const link = ctx.config.publicUrl + clientPaths.resetPassword(token);
      try {
        await ctx.mailer.send(passwordResetMail({ to: user.email, name: user.name, link }));
      } catch (err) {
        // The answer is the same either way (no account enumeration); the operator sees the log.
        if (ctx.config.logErrors) console.error('[slackline] could not send reset mail:', err);
      }
    }
    return { ok: true as const };
  });

  mount(r, ctx, routes.confirmPasswordReset, async ({ body }) => {
    const now = clock.now();
    const tokenHash = hashToken(body.token);
    const userId = await db.transaction(async (tx) => {
      const [reset] = await tx
        .select()
        .from(passwordResets)
        .where(and(eq(passwordResets.tokenHash, tokenHash), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, now)))
        .limit(1)
        .for('update');
      if (!reset) return null;
      const used = await tx
        .update(passwordResets)
        .set({ usedAt: now })
        .where(and(eq(passwordResets.id, reset.id), isNull(passwordResets.usedAt)));
      if (affectedRows(used) !== 1) return null;
      await tx.update(users).set({ passwordHash: await hashPassword(body.password) }).where(eq(users.id, reset.userId));
      // Every other outstanding reset link of this account stops working too.
      await tx
        .update(passwordResets)
        .set({ usedAt: now })
        .where(and(eq(passwordResets.userId, reset.userId), isNull(passwordResets.usedAt)));
      return reset.userId;
    });
    if (!userId) throw new HttpError(400, 'invalid_token', 'This reset link is unknown, already used or expired; ask for a new one', { token: 'Invalid or expired' });
    await lucia.invalidateUserSessions(userId);
  });

  return r;
}
