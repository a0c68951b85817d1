/** Notebooks: list, create, get with cells, rename, delete. Every query is scoped to the workspace. */
import { Router } from 'express';
import { and, asc, desc, eq } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import type { Notebook } from '../../shared/api/notebooks';
import { toCell } from '../notebook/cells';
import { notebookPage } from '../notebook/page';
import type { AppContext } from '../context';
import type { Exec } from '../lib/audit';
import { cells, notebooks } from '../db/schema';
import { mount } from '../http/route';
import { notFound } from '../http/errors';
import { audit } from '../lib/audit';
import { newId } from '../lib/ids';

export const toNotebook = (n: typeof notebooks.$inferSelect): Notebook => ({
  id: n.id,
  workspaceId: n.workspaceId,
  title: n.title,
  createdAt: n.createdAt.toISOString(),
  updatedAt: n.updatedAt.toISOString(),
});

/** The notebook with this id inside this workspace, or 404. */
export async function findNotebook(exec: Exec, workspaceId: string, notebookId: string) {
  const [nb] = await exec
    .select()
    .from(notebooks)
    .where(and(eq(notebooks.workspaceId, workspaceId), eq(notebooks.id, notebookId)))
    .limit(1);
  if (!nb) throw notFound('Notebook not found');
  return nb;
}

export async function notebookCells(exec: Exec, workspaceId: string, notebookId: string) {
  const rows = await exec
    .select()
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId)))
    .orderBy(asc(cells.position), asc(cells.createdAt));
  return rows.map(toCell);
}

export function notebooksRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.listNotebooks, async (_v, req) => {
    const rows = await db
      .select()
      .from(notebooks)
      .where(eq(notebooks.workspaceId, req.workspace!.id))
      .orderBy(desc(notebooks.updatedAt), notebooks.id);
    return { notebooks: rows.map(toNotebook) };
  });

  mount(r, ctx, routes.createNotebook, async ({ body }, req) => {
    const now = clock.now();
    const row = {
      id: newId(),
      workspaceId: req.workspace!.id,
      title: body.title,
      createdBy: req.user!.id,
      createdAt: now,
      updatedAt: now,
    };
    await db.insert(notebooks).values(row);
    return { notebook: toNotebook(row) };
  });

  mount(r, ctx, routes.getNotebook, async ({ params }, req) => {
    const ws = req.workspace!;
    const nb = await findNotebook(db, ws.id, params.notebookId);
    return {
      notebook: toNotebook(nb),
      cells: await notebookCells(db, ws.id, nb.id),
      role: ws.role,
      workspaceName: ws.name,
    };
  });

  mount(r, ctx, routes.getNotebookPage, async ({ params }, req) => {
    const ws = req.workspace!;
    return notebookPage(db, { id: ws.id, role: ws.role, name: ws.name }, params.notebookId, clock.now());
  });

  mount(r, ctx, routes.renameNotebook, async ({ params, body }, req) => {
    const ws = req.workspace!;
    const nb = await findNotebook(db, ws.id, params.notebookId);
    const now = clock.now();
    await db
      .update(notebooks)
      .set({ title: body.title, updatedAt: now })
      .where(and(eq(notebooks.workspaceId, ws.id), eq(notebooks.id, nb.id)));
    return { notebook: toNotebook({ ...nb, title: body.title, updatedAt: now }) };
  });

  mount(r, ctx, routes.deleteNotebook, async ({ params }, req) => {
    const ws = req.workspace!;
    await db.transaction(async (tx) => {
      const nb = await findNotebook(tx, ws.id, params.notebookId);
      await tx.delete(notebooks).where(and(eq(notebooks.workspaceId, ws.id), eq(notebooks.id, nb.id)));
      await audit(tx, {
        workspaceId: ws.id, actorId: req.user!.id, action: 'notebook.deleted', targetType: 'notebook',
        targetId: nb.id, detail: { title: nb.title }, at: clock.now(),
      });
    });
  });

  return r;
}
