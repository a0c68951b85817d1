/**
 * Health check, and the development-only view of captured mail with its per-start key.
 *
 * The captured mail holds password-reset and invitation links, so reading it is as good as taking
 * over the accounts it was sent to. Outside production it opens only to:
 *  - the holder of the per-start key (config.devMailKey, printed by `npm start`): the link
 *    /dev/mail?key=… stores the key in an HttpOnly, SameSite=Strict cookie and redirects to the
 *    page without it; the API also takes `?key=` once (scripts) and sets the same cookie;
 *  - a signed-in account, for mail addressed to its own address only (it could read that mail in a
 *    real inbox anyway).
 * Everyone else gets 403. In production the route answers 404 and the capture never runs.
 */
import { createHash, timingSafeEqual } from 'node:crypto';
import { Router, type Request, type Response } from 'express';
import { desc } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import type { AppContext } from '../context';
import { mailOutbox } from '../db/schema';
import { mount } from '../http/route';
import { forbidden, notFound } from '../http/errors';
import { toCapturedMail } from '../mail/capture-server';

export const DEV_MAIL_COOKIE = 'slackline_devmail';

export function systemRouter(ctx: AppContext): Router {
  const r = Router();

  mount(r, ctx, routes.health, async (_v, _req, res) => {
    const up = await ctx.pingDb();
    if (!up) {
      res.status(503).json({ status: 'degraded', database: 'down' });
      return undefined as never;
    }
    return { status: 'ok' as const, database: 'up' as const };
  });

  return r;
}

const digest = (s: string) => createHash('sha256').update(s, 'utf8').digest();
/** Constant-time comparison of a presented key with the configured one. */
export function devKeyMatches(expected: string | null, presented: unknown): boolean {
  if (!expected || typeof presented !== 'string' || presented === '') return false;
  return timingSafeEqual(digest(expected), digest(presented));
}

function cookieValue(req: Request, name: string): string | undefined {
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === name) {
      try {
        return decodeURIComponent(part.slice(eq + 1).trim());
      } catch {
        return undefined;
      }
    }
  }
  return undefined;
}

function setDevCookie(req: Request, res: Response, key: string): void {
  // No expiry: a browser-session cookie, and a new start makes it worthless anyway.
  res.cookie(DEV_MAIL_COOKIE, key, { httpOnly: true, sameSite: 'strict', secure: req.secure, path: '/' });
}

/** The captured-mail page's key exchange and API. Mounted after the session middleware. */
export function devMailRouter(ctx: AppContext): Router {
  const r = Router();
  const key = () => ctx.config.devMailKey;

  // The link printed at start: keep the key in a cookie and drop it from the address bar
  // (so it is neither in the history nor sent on as a Referer).
  r.get('/dev/mail', (req, res, next) => {
    if (ctx.config.production || typeof req.query.key !== 'string') return next();
    if (!devKeyMatches(key(), req.query.key)) return next(forbidden('This capture key is not the one printed by this start of the server'));
    setDevCookie(req, res, req.query.key);
    res.set('Cache-Control', 'no-store');
    res.redirect(303, '/dev/mail');
  });

  mount(r, ctx, routes.devMail, async ({ query }, req, res) => {
    if (ctx.config.production) throw notFound('No such route');
    let all = false;
    if (query.key !== undefined) {
      if (!devKeyMatches(key(), query.key)) throw forbidden('This capture key is not the one printed by this start of the server');
      setDevCookie(req, res, query.key);
      all = true;
    } else if (devKeyMatches(key(), cookieValue(req, DEV_MAIL_COOKIE))) {
      all = true;
    }
    if (!all && !req.user) {
      throw forbidden('The captured mail opens with the link printed by `npm start` (it carries a key), or signed in for your own mail');
    }
    // Without the key a signed-in account sees its own mail only.
    const wanted = [query.to, all ? undefined : req.user!.email.toLowerCase()].filter((x): x is string => !!x);
    const rows = await ctx.db
      .select()
      .from(mailOutbox)
      .orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id))
      .limit(wanted.length > 0 ? 1000 : (query.limit ?? 50));
    const filtered = rows.filter((m) => wanted.every((a) => m.toAddresses.includes(a)));
    return {
      messages: filtered.slice(0, query.limit ?? 50).map(toCapturedMail),
      scope: all ? ('all' as const) : ('own' as const),
    };
  });

  return r;
}
