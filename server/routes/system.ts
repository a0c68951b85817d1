/** Health check and the development-only view of captured mail. */
import { Router } from 'express';
import { desc } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import type { AppContext } from '../context';
import { mailOutbox } from '../db/schema';
import { mount } from '../http/route';
import { toCapturedMail } from '../mail/capture-server';

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

  mount(r, ctx, routes.devMail, async ({ query }) => {
    const rows = await ctx.db
      .select()
      .from(mailOutbox)
      .orderBy(desc(mailOutbox.createdAt), desc(mailOutbox.id))
      .limit(query.to ? 1000 : (query.limit ?? 50));
    const filtered = query.to ? rows.filter((m) => m.toAddresses.includes(query.to!)) : rows;
    return {
      messages: filtered.slice(0, query.limit ?? 50).map(toCapturedMail),
    };
  });

  return r;
}
