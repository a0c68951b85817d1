/** Accounts: sign up (confirmed by e-mail), sign in, sign out, me, password reset by e-mail. */
import { Router, type RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import { and, count, eq, gt, isNull, lt } from 'drizzle-orm';
import { routes, clientPaths } from '../../shared/api/routes';
import { SIGN_UP_ANSWER, type User } from '../../shared/api/auth';
import type { AppContext } from '../context';
import { passwordResets, pendingSignUps, users } from '../db/schema';
import { mount } from '../http/route';
import { HttpError, unauthenticated } from '../http/errors';
import { hashPassword, verifyDummy, verifyPassword } from '../auth/password';
import { clearSessionCookie, setSessionCookie } from '../auth/session';
import { hashToken, newId, newToken } from '../lib/ids';
import { affectedRows, isDuplicateKey } from '../lib/audit';
import { passwordResetMail, signUpAttemptMail, signUpConfirmationMail } from '../mail/templates';
import { FailureBudget } from '../auth/limits';
import { afterResponse } from '../http/after-response';

export const RESET_TOKEN_TTL_MS = 60 * 60_000;
/** How long a sign-up confirmation link works. */
export const SIGN_UP_TOKEN_TTL_MS = 24 * 60 * 60_000;

export const toUser = (u: { id: string; email: string; name: string; createdAt: Date }): User => ({
  id: u.id,
  email: u.email,
  name: u.name,
  createdAt: u.createdAt.toISOString(),
});

/**
 * Per client address and route. `failuresOnly` counts failed answers only (status ≥ 400), so people
 * who sign in correctly do not use up the budget of their office's shared address; once it is used
 * up every attempt from the address is refused until the window ends. Routes that create accounts
 * or send mail count every request.
 */
export function limiter(ctx: AppContext, opts: { failuresOnly: boolean }): RequestHandler {
  return rateLimit({
    windowMs: ctx.config.authRateLimit.windowMs,
    limit: ctx.config.authRateLimit.limit,
    skipSuccessfulRequests: opts.failuresOnly,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    handler: (_req, _res, next) =>
      next(new HttpError(429, 'rate_limited', 'Too many attempts from your address; wait a few minutes and try again')),
  });
}

export function authRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, lucia, clock } = ctx;
  const limits = ctx.config.accountLimits;
  const signInFailures = new FailureBudget(clock, () => limits.windowMs, () => limits.signInFailures);
  // One "someone tried to sign up with your address" notice per address and window, so repeated
  // attempts do not become a stream of mail to that person.
  const signUpNotices = new FailureBudget(clock, () => limits.windowMs, () => 1);
  // One budget per route and client address.
  r.use(routes.signIn.path, limiter(ctx, { failuresOnly: true }));
  r.use(routes.signUp.path, limiter(ctx, { failuresOnly: false }));
  r.use(routes.confirmSignUp.path, limiter(ctx, { failuresOnly: true }));
  r.use(routes.requestPasswordReset.path, limiter(ctx, { failuresOnly: false }));
  r.use(routes.confirmPasswordReset.path, limiter(ctx, { failuresOnly: true }));

  // Every valid sign-up gets the same answer before anything is looked up: whether the address
  // has an account shows neither in the answer nor in its timing. The work happens afterwards:
  // a registered address gets a notice to its owner, a new one a confirmation link; the account
  // is created only when that link is used (confirmSignUp), so nobody holds an address they
  // cannot read mail at.
  mount(r, ctx, routes.signUp, async ({ body }, _req, res) => {
    afterResponse(res, async () => {
      // Hashed for registered addresses too, so the server's load after a sign-up does not differ.
      const passwordHash = await hashPassword(body.password);
      const [owner] = await db.select({ email: users.email, name: users.name }).from(users).where(eq(users.email, body.email)).limit(1);
      if (owner) {
        // One notice per address and window, so repeated attempts do not flood its owner.
        if (signUpNotices.exhausted(body.email)) return;
        signUpNotices.fail(body.email);
        await ctx.mailer.send(signUpAttemptMail({
          to: owner.email, name: owner.name,
          signInLink: ctx.config.publicUrl + '/sign-in',
          resetLink: ctx.config.publicUrl + '/forgot-password',
        }));
        return;
      }
      const now = clock.now();
      // Expired requests (and the password hashes in them) are of no further use.
      await db.delete(pendingSignUps).where(lt(pendingSignUps.expiresAt, now));
      // Per-address budget, counted from the stored requests: a flood of sign-ups for one address
      // does not become a flood of mail to it.
      const [recent] = await db
        .select({ n: count() })
        .from(pendingSignUps)
        .where(and(eq(pendingSignUps.email, body.email), gt(pendingSignUps.createdAt, new Date(now.getTime() - limits.windowMs))));
      if ((recent?.n ?? 0) >= limits.resetRequests) return;
      const token = newToken();
      const expiresAt = new Date(now.getTime() + SIGN_UP_TOKEN_TTL_MS);
      await db.insert(pendingSignUps).values({
        id: newId(), email: body.email, name: body.name, passwordHash,
        tokenHash: hashToken(token), expiresAt, createdAt: now,
      });
      await ctx.mailer.send(signUpConfirmationMail({
        to: body.email, name: body.name, expiresAt,
        link: ctx.config.publicUrl + clientPaths.confirmSignUp(token, body.next),
      }));
    }, ctx, 'sign-up mail');
    return { ok: true as const, message: SIGN_UP_ANSWER };
  });

  mount(r, ctx, routes.confirmSignUp, async ({ body }, req, res) => {
    const now = clock.now();
    const tokenHash = hashToken(body.token);
    const outcome = await db.transaction(async (tx) => {
      const [pending] = await tx
        .select()
        .from(pendingSignUps)
        .where(and(eq(pendingSignUps.tokenHash, tokenHash), isNull(pendingSignUps.usedAt), gt(pendingSignUps.expiresAt, now)))
        .limit(1)
        .for('update');
      if (!pending) return { kind: 'invalid' as const };
      const used = await tx
        .update(pendingSignUps)
        .set({ usedAt: now })
        .where(and(eq(pendingSignUps.id, pending.id), isNull(pendingSignUps.usedAt)));
      if (affectedRows(used) !== 1) return { kind: 'invalid' as const };
      const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, pending.email)).limit(1);
      if (existing) return { kind: 'taken' as const };
      const user = { id: newId(), email: pending.email, name: pending.name, createdAt: now };
      await tx.insert(users).values({ ...user, passwordHash: pending.passwordHash });
      // Every other outstanding link for this address stops working (one account per address),
      // and no copy of the password hash stays behind.
      await tx.delete(pendingSignUps).where(eq(pendingSignUps.email, pending.email));
      return { kind: 'created' as const, user };
    }).catch((err: unknown) => {
      // Two links for the same address used at the same moment: the second finds the account made.
      if (isDuplicateKey(err)) return { kind: 'taken' as const };
      throw err;
    });
    if (outcome.kind === 'invalid') {
      throw new HttpError(400, 'invalid_token', 'This confirmation link is unknown, already used or expired; sign up again to get a new one', { token: 'Invalid or expired' });
    }
    if (outcome.kind === 'taken') {
      // Only whoever reads this address's mail gets here, so naming the account reveals nothing.
      throw new HttpError(409, 'conflict', 'This address already has an account; sign in, or reset the password by e-mail', { token: 'Already used' });
    }
    if (req.sessionId) await lucia.invalidateSession(req.sessionId);
    const session = await lucia.createSession(outcome.user.id, {});
    setSessionCookie(req, res, session.id, session.expiresAt);
    return { user: toUser(outcome.user) };
  });

  mount(r, ctx, routes.signIn, async ({ body }, req, res) => {
    // Past the account's failure budget nothing is checked, so a right guess looks like a wrong one.
    if (signInFailures.exhausted(body.email)) {
      throw new HttpError(429, 'rate_limited', 'Too many failed sign-ins for this account; wait a few minutes, or reset the password by e-mail');
    }
    const [user] = await db.select().from(users).where(eq(users.email, body.email)).limit(1);
    if (!user) {
      await verifyDummy(body.password);
      signInFailures.fail(body.email);
      throw new HttpError(401, 'invalid_credentials', 'E-mail or password is wrong');
    }
    if (!(await verifyPassword(user.passwordHash, body.password))) {
      signInFailures.fail(body.email);
      throw new HttpError(401, 'invalid_credentials', 'E-mail or password is wrong');
    }
    signInFailures.clear(body.email);
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

  // Everything after validation happens once the answer has gone out: a known and an unknown
  // address get the same answer after the same work (no account enumeration by timing).
  mount(r, ctx, routes.requestPasswordReset, async ({ body }, _req, res) => {
    afterResponse(res, async () => {
      const sent = await db.transaction(async (tx) => {
        // The account row is locked so concurrent requests count one after another.
        const [user] = await tx.select().from(users).where(eq(users.email, body.email)).limit(1).for('update');
        if (!user) return null;
        const now = clock.now();
        // Per-account budget: a flood of requests does not become a flood of mail to one person.
        const [recent] = await tx
          .select({ n: count() })
          .from(passwordResets)
          .where(and(eq(passwordResets.userId, user.id), gt(passwordResets.createdAt, new Date(now.getTime() - limits.windowMs))));
        if ((recent?.n ?? 0) >= limits.resetRequests) return null;
        const token = newToken();
        await tx.insert(passwordResets).values({
          id: newId(),
          userId: user.id,
          tokenHash: hashToken(token),
          expiresAt: new Date(now.getTime() + RESET_TOKEN_TTL_MS),
          createdAt: now,
        });
        return { user, link: ctx.config.publicUrl + clientPaths.resetPassword(token) };
      });
      if (sent) await ctx.mailer.send(passwordResetMail({ to: sent.user.email, name: sent.user.name, link: sent.link }));
    }, ctx, 'reset mail');
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
    // Whoever could read the mail owns the account: the sign-in lock is lifted for them.
    const [u] = await db.select({ email: users.email }).from(users).where(eq(users.id, userId));
    if (u) signInFailures.clear(u.email);
  });

  return r;
}
