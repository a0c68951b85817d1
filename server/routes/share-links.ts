/**
 * Read-only share links of a notebook. The token (256 random bits) is shown once at creation;
 * only its SHA-256 is stored. GET /api/share/:token reads that notebook and nothing else.
 */
import { Router } from 'express';
import { and, desc, eq, isNull } from 'drizzle-orm';
import { routes, clientPaths } from '../../shared/api/routes';
import type { ShareLink } from '../../shared/api/notebooks';
import type { AppContext } from '../context';
import { notebooks, shareLinks, users, workspaces } from '../db/schema';
import { mount } from '../http/route';
import { badRequest, notFound } from '../http/errors';
import { audit, type Tx } from '../lib/audit';
import { hashToken, newId, newToken } from '../lib/ids';
import { findNotebook, notebookCells, toNotebook } from './notebooks';

/**
 * A share link speaks for its creator: when the creator loses the right to make links (falls
 * below editor) or leaves the workspace, their live links are revoked, one audit row each.
 */
export async function revokeLinksOfCreator(
  tx: Tx,
  p: { workspaceId: string; creatorId: string; actorId: string; reason: 'creator_demoted' | 'creator_removed' | 'creator_left'; at: Date },
): Promise<number> {
  const live = await tx
    .select({ id: shareLinks.id, notebookId: shareLinks.notebookId })
    .from(shareLinks)
    .where(and(eq(shareLinks.workspaceId, p.workspaceId), eq(shareLinks.createdBy, p.creatorId), isNull(shareLinks.revokedAt)))
    .for('update');
  for (const link of live) {
    await tx.update(shareLinks).set({ revokedAt: p.at }).where(and(eq(shareLinks.workspaceId, p.workspaceId), eq(shareLinks.id, link.id)));
    await audit(tx, {
      workspaceId: p.workspaceId, actorId: p.actorId, action: 'share_link.revoked', targetType: 'share_link',
      targetId: link.id, detail: { notebookId: link.notebookId, reason: p.reason, creatorId: p.creatorId }, at: p.at,
    });
  }
  return live.length;
}

export function shareLinksRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  const toLink = (l: typeof shareLinks.$inferSelect, creatorName: string | null, now: Date): ShareLink => ({
    id: l.id,
    notebookId: l.notebookId,
    createdBy: { id: l.createdBy ?? '', name: creatorName ?? '(deleted account)' },
    createdAt: l.createdAt.toISOString(),
    expiresAt: l.expiresAt?.toISOString() ?? null,
    revokedAt: l.revokedAt?.toISOString() ?? null,
    active: !l.revokedAt && (!l.expiresAt || l.expiresAt > now),
  });

  mount(r, ctx, routes.listShareLinks, async ({ params }, req) => {
    const ws = req.workspace!;
    const nb = await findNotebook(db, ws.id, params.notebookId);
    const rows = await db
      .select({ link: shareLinks, creatorName: users.name })
      .from(shareLinks)
      .leftJoin(users, eq(users.id, shareLinks.createdBy))
      .where(and(eq(shareLinks.workspaceId, ws.id), eq(shareLinks.notebookId, nb.id)))
      .orderBy(desc(shareLinks.createdAt), shareLinks.id);
    const now = clock.now();
    return { links: rows.map((x) => toLink(x.link, x.creatorName, now)) };
  });

  mount(r, ctx, routes.listWorkspaceShareLinks, async (_v, req) => {
    const ws = req.workspace!;
    const rows = await db
      .select({ link: shareLinks, creatorName: users.name, notebookTitle: notebooks.title })
      .from(shareLinks)
      .innerJoin(notebooks, and(eq(notebooks.workspaceId, shareLinks.workspaceId), eq(notebooks.id, shareLinks.notebookId)))
      .leftJoin(users, eq(users.id, shareLinks.createdBy))
      .where(eq(shareLinks.workspaceId, ws.id))
      .orderBy(desc(shareLinks.createdAt), shareLinks.id)
      .limit(500);
    const now = clock.now();
    return { links: rows.map((x) => ({ ...toLink(x.link, x.creatorName, now), notebookTitle: x.notebookTitle })) };
  });

  mount(r, ctx, routes.createShareLink, async ({ params, body }, req) => {
    const ws = req.workspace!;
    const now = clock.now();
    const expiresAt = body.expiresAt ? new Date(body.expiresAt) : null;
    if (expiresAt && expiresAt <= now) throw badRequest('The expiry must be in the future', { expiresAt: 'Must be in the future' });
    const token = newToken();
    const row = {
      id: newId(),
      workspaceId: ws.id,
      notebookId: params.notebookId,
      tokenHash: hashToken(token),
      createdBy: req.user!.id,
      createdAt: now,
      expiresAt,
      revokedAt: null,
    };
    await db.transaction(async (tx) => {
      await findNotebook(tx, ws.id, params.notebookId);
      await tx.insert(shareLinks).values(row);
      await audit(tx, {
        workspaceId: ws.id, actorId: req.user!.id, action: 'share_link.created', targetType: 'share_link',
        targetId: row.id, detail: { notebookId: row.notebookId, expiresAt: expiresAt?.toISOString() ?? null }, at: now,
      });
    });
    return { link: toLink(row, req.user!.name, now), token, path: clientPaths.share(token) };
  });

  mount(r, ctx, routes.revokeShareLink, async ({ params }, req) => {
    const ws = req.workspace!;
    const now = clock.now();
    await db.transaction(async (tx) => {
      const [link] = await tx
        .select()
        .from(shareLinks)
        .where(
          and(
            eq(shareLinks.workspaceId, ws.id),
            eq(shareLinks.notebookId, params.notebookId),
            eq(shareLinks.id, params.linkId),
            isNull(shareLinks.revokedAt),
          ),
        )
        .for('update');
      if (!link) throw notFound('No such active share link');
      await tx
        .update(shareLinks)
        .set({ revokedAt: now })
        .where(and(eq(shareLinks.workspaceId, ws.id), eq(shareLinks.id, link.id)));
      await audit(tx, {
        workspaceId: ws.id, actorId: req.user!.id, action: 'share_link.revoked', targetType: 'share_link',
        targetId: link.id, detail: { notebookId: link.notebookId }, at: now,
      });
    });
  });

  mount(r, ctx, routes.getSharedNotebook, async (_v, req) => {
    const share = req.share!;
    const nb = await findNotebook(db, share.workspaceId, share.notebookId);
    const [ws] = await db.select({ name: workspaces.name }).from(workspaces).where(eq(workspaces.id, share.workspaceId));
    const { workspaceId: _omit, ...notebook } = toNotebook(nb);
    return {
      notebook,
      cells: await notebookCells(db, share.workspaceId, nb.id),
      workspaceName: ws?.name ?? '',
      expiresAt: share.expiresAt?.toISOString() ?? null,
    };
  });

  return r;
}
