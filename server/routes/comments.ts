/** Comments on cells: reviewers and above read, write, reply, resolve and reopen. */
import { Router } from 'express';
import { and, asc, eq } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import type { Comment } from '../../shared/api/notebook';
import type { AppContext } from '../context';
import { comments, users } from '../db/schema';
import { mount } from '../http/route';
import { badRequest, notFound } from '../http/errors';
import { newId } from '../lib/ids';
import type { Exec } from '../lib/audit';
import { findCell } from '../notebook/cells';
import { findNotebook } from './notebooks';

type Row = typeof comments.$inferSelect & { authorName: string | null };

export const toComment = (c: Row): Comment => ({
  id: c.id,
  cellId: c.cellId,
  author: c.authorId && c.authorName !== null ? { id: c.authorId, name: c.authorName } : null,
  body: c.body,
  replyTo: c.parentId ?? null,
  resolved: c.resolved,
  createdAt: c.createdAt.toISOString(),
  updatedAt: c.updatedAt.toISOString(),
});

export async function loadComments(exec: Exec, workspaceId: string, notebookId: string, commentId?: string): Promise<Row[]> {
  const where = commentId
    ? and(eq(comments.workspaceId, workspaceId), eq(comments.notebookId, notebookId), eq(comments.id, commentId))
    : and(eq(comments.workspaceId, workspaceId), eq(comments.notebookId, notebookId));
  const rows = await exec
    .select({ c: comments, authorName: users.name })
    .from(comments)
    .leftJoin(users, eq(users.id, comments.authorId))
    .where(where)
    .orderBy(asc(comments.createdAt), asc(comments.id));
  return rows.map((r) => ({ ...r.c, authorName: r.authorName }));
}

export function commentsRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.listComments, async ({ params }, req) => {
    const ws = req.workspace!;
    await findNotebook(db, ws.id, params.notebookId);
    return { comments: (await loadComments(db, ws.id, params.notebookId)).map(toComment) };
  });

  mount(r, ctx, routes.commentCounts, async ({ params }, req) => {
    const ws = req.workspace!;
    await findNotebook(db, ws.id, params.notebookId);
    const rows = await loadComments(db, ws.id, params.notebookId);
    const counts: Record<string, { open: number; total: number }> = {};
    for (const c of rows) {
      const k = (counts[c.cellId] ??= { open: 0, total: 0 });
      k.total++;
      if (!c.parentId && !c.resolved) k.open++;
    }
    return { counts };
  });

  mount(r, ctx, routes.createComment, async ({ params, body }, req) => {
    const ws = req.workspace!;
    const cell = await findCell(db, ws.id, params.notebookId, params.cellId);
    let parentId: string | null = null;
    if (body.replyTo) {
      const [parent] = await loadComments(db, ws.id, params.notebookId, body.replyTo);
      if (!parent || parent.cellId !== cell.id) throw badRequest('replyTo: no such comment on this cell', { replyTo: 'No such comment on this cell' });
      // Replies attach to the thread's first comment, so threads stay one level deep.
      parentId = parent.parentId ?? parent.id;
    }
    const now = clock.now();
    const row = {
      id: newId(),
      workspaceId: ws.id,
      notebookId: params.notebookId,
      cellId: cell.id,
      parentId,
      authorId: req.user!.id,
      body: body.body,
      resolved: false,
      resolvedBy: null,
      resolvedAt: null,
      createdAt: now,
      updatedAt: now,
    };
    await db.insert(comments).values(row);
    return { comment: toComment({ ...row, authorName: req.user!.name }) };
  });

  mount(r, ctx, routes.resolveComment, async ({ params, body }, req) => {
    const ws = req.workspace!;
    const [found] = await loadComments(db, ws.id, params.notebookId, params.commentId);
    if (!found) throw notFound('Comment not found');
    const rootId = found.parentId ?? found.id;
    const now = clock.now();
    await db
      .update(comments)
      .set({ resolved: body.resolved, resolvedBy: body.resolved ? req.user!.id : null, resolvedAt: body.resolved ? now : null, updatedAt: now })
      .where(and(eq(comments.workspaceId, ws.id), eq(comments.id, rootId)));
    const [root] = await loadComments(db, ws.id, params.notebookId, rootId);
    return { comment: toComment(root) };
  });

  return r;
}
