/**
 * Cells: add, save (versioned; a stale version gets 409 with both texts), move, collapse, delete.
 * A save is one compare-and-set UPDATE … WHERE version = baseVersion, so two editors saving at
 * once cannot both win and nothing is overwritten silently.
 */
import { Router } from 'express';
import { and, eq } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import { checkCellContent, defaultCellContent, type CellConflictResponse, type CellContent } from '../../shared/api/notebook';
import type { AppContext } from '../context';
import { cells } from '../db/schema';
import { mount } from '../http/route';
import { badRequest, notFound } from '../http/errors';
import { newId } from '../lib/ids';
import { closeGap, findCell, lockNotebook, moveWithin, openGap, orderedCells, toCell, touchNotebook } from '../notebook/cells';

export function cellsRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.createCell, async ({ params, body }, req) => {
    const ws = req.workspace!;
    let content: CellContent = defaultCellContent(body.kind);
    if (body.content !== undefined) {
      const checked = checkCellContent(body.kind, body.content);
      if (!checked.ok) throw badRequest('The cell content does not fit its kind', checked.fields);
      content = checked.content;
    }
    const now = clock.now();
    const row = await db.transaction(async (tx) => {
      await lockNotebook(tx, ws.id, params.notebookId);
      const existing = await orderedCells(tx, ws.id, params.notebookId);
      const position = Math.min(body.position ?? existing.length, existing.length);
      await openGap(tx, ws.id, params.notebookId, position);
      const values = {
        id: newId(),
        workspaceId: ws.id,
        notebookId: params.notebookId,
        kind: body.kind,
        position,
        source: body.source ?? '',
        content,
        version: 1,
        collapsed: false,
        createdBy: req.user!.id,
        updatedBy: req.user!.id,
        createdAt: now,
        updatedAt: now,
      };
      await tx.insert(cells).values(values);
      await touchNotebook(tx, ws.id, params.notebookId, now);
      return values;
    });
    return { cell: toCell(row) };
  });

  mount(r, ctx, routes.saveCell, async ({ params, body }, req, res) => {
    const ws = req.workspace!;
    const current = await findCell(db, ws.id, params.notebookId, params.cellId);
    const patch: { source?: string; content?: CellContent } = {};
    if (body.source !== undefined) patch.source = body.source;
    if (body.content !== undefined) {
      const checked = checkCellContent(current.kind, body.content);
      if (!checked.ok) throw badRequest('The cell content does not fit its kind', checked.fields);
      patch.content = checked.content;
    }
    const now = clock.now();
    const [result] = await db
      .update(cells)
      .set({ ...patch, version: body.baseVersion + 1, updatedBy: req.user!.id, updatedAt: now })
      .where(and(eq(cells.workspaceId, ws.id), eq(cells.id, current.id), eq(cells.version, body.baseVersion)));
    if (result.affectedRows === 0) {
      const latest = await findCell(db, ws.id, params.notebookId, params.cellId);
      const conflict: CellConflictResponse = {
        error: {
          code: 'conflict',
          message: `This cell was saved by someone else (version ${latest.version}; your edit started from version ${body.baseVersion}). Nothing was overwritten.`,
        },
        conflict: { current: toCell(latest), yours: { baseVersion: body.baseVersion, ...patch } },
      };
      res.status(409).json(conflict);
      return undefined as never;
    }
    await touchNotebook(db, ws.id, params.notebookId, now);
    return { cell: toCell(await findCell(db, ws.id, params.notebookId, params.cellId)) };
  });

  mount(r, ctx, routes.moveCell, async ({ params, body }, req) => {
    const ws = req.workspace!;
    const order = await db.transaction(async (tx) => {
      await lockNotebook(tx, ws.id, params.notebookId);
      const list = await orderedCells(tx, ws.id, params.notebookId);
      // Normalise positions first (0..n-1) so the shifts below are exact after any history.
      for (let i = 0; i < list.length; i++) {
        if (list[i].position !== i) await tx.update(cells).set({ position: i }).where(and(eq(cells.workspaceId, ws.id), eq(cells.id, list[i].id)));
      }
      const from = list.findIndex((c) => c.id === params.cellId);
      if (from < 0) throw notFound('Cell not found');
      const to =
        'direction' in body
          ? Math.max(0, Math.min(list.length - 1, from + (body.direction === 'up' ? -1 : 1)))
          : Math.min(body.position, list.length - 1);
      await moveWithin(tx, ws.id, params.notebookId, params.cellId, from, to);
      await touchNotebook(tx, ws.id, params.notebookId, clock.now());
      return (await orderedCells(tx, ws.id, params.notebookId)).map((c) => ({ id: c.id, position: c.position }));
    });
    return { order };
  });

  mount(r, ctx, routes.collapseCell, async ({ params, body }, req) => {
    const ws = req.workspace!;
    const cell = await findCell(db, ws.id, params.notebookId, params.cellId);
    await db.update(cells).set({ collapsed: body.collapsed }).where(and(eq(cells.workspaceId, ws.id), eq(cells.id, cell.id)));
    return { cell: toCell({ ...cell, collapsed: body.collapsed }) };
  });

  mount(r, ctx, routes.deleteCell, async ({ params }, req) => {
    const ws = req.workspace!;
    await db.transaction(async (tx) => {
      await lockNotebook(tx, ws.id, params.notebookId);
      const cell = await findCell(tx, ws.id, params.notebookId, params.cellId);
      await tx.delete(cells).where(and(eq(cells.workspaceId, ws.id), eq(cells.id, cell.id)));
      await closeGap(tx, ws.id, params.notebookId, cell.position);
      await touchNotebook(tx, ws.id, params.notebookId, clock.now());
    });
  });

  return r;
}
