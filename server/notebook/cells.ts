/** Cell storage: ordering, versioned saves, row mapping. Every query is scoped to the workspace. */
import { and, asc, eq, gt, gte, lt, lte, sql } from 'drizzle-orm';
import type { NbCellKind } from '../../shared/api/notebook';
import type { Cell } from '../../shared/api/notebooks';
import { cells, notebooks } from '../db/schema';
import type { Exec } from '../lib/audit';
import { notFound } from '../http/errors';
import { CELL_KINDS } from '../../shared/terms';

export type CellRow = typeof cells.$inferSelect;

/** A cell row as the API answers it. */
export const toCell = (c: CellRow): Cell => ({
  id: c.id,
  notebookId: c.notebookId,
  kind: c.kind,
  position: c.position,
  source: c.source,
  content: c.content ?? null,
  version: c.version,
  collapsed: c.collapsed,
  createdAt: c.createdAt.toISOString(),
  updatedAt: c.updatedAt.toISOString(),
});

export async function findCell(exec: Exec, workspaceId: string, notebookId: string, cellId: string): Promise<CellRow> {
  const [row] = await exec
    .select()
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), eq(cells.id, cellId)))
    .limit(1);
  if (!row) throw notFound('Cell not found');
  return row;
}

/** Lock the notebook row so concurrent inserts and moves renumber positions one at a time. */
export async function lockNotebook(exec: Exec, workspaceId: string, notebookId: string): Promise<void> {
  const [nb] = await exec
    .select({ id: notebooks.id })
    .from(notebooks)
    .where(and(eq(notebooks.workspaceId, workspaceId), eq(notebooks.id, notebookId)))
    .for('update');
  if (!nb) throw notFound('Notebook not found');
}

export async function orderedCells(exec: Exec, workspaceId: string, notebookId: string): Promise<CellRow[]> {
  return exec
    .select()
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId)))
    .orderBy(asc(cells.position), asc(cells.createdAt));
}

/** Make room at `position` (0-based) by shifting later cells down one place. */
export async function openGap(exec: Exec, workspaceId: string, notebookId: string, position: number): Promise<void> {
  await exec
    .update(cells)
    .set({ position: sql`${cells.position} + 1` })
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), gte(cells.position, position)));
}

/** Close the gap left at `position`. */
export async function closeGap(exec: Exec, workspaceId: string, notebookId: string, position: number): Promise<void> {
  await exec
    .update(cells)
    .set({ position: sql`${cells.position} - 1` })
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), gt(cells.position, position)));
}

/** Move a cell from `from` to `to` (0-based), shifting the cells in between. */
export async function moveWithin(exec: Exec, workspaceId: string, notebookId: string, cellId: string, from: number, to: number): Promise<void> {
  if (from === to) return;
  const scope = and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId));
  if (to < from) {
    await exec
      .update(cells)
      .set({ position: sql`${cells.position} + 1` })
      .where(and(scope, gte(cells.position, to), lt(cells.position, from)));
  } else {
    await exec
      .update(cells)
      .set({ position: sql`${cells.position} - 1` })
      .where(and(scope, gt(cells.position, from), lte(cells.position, to)));
  }
  await exec.update(cells).set({ position: to }).where(and(scope, eq(cells.id, cellId)));
}

export async function touchNotebook(exec: Exec, workspaceId: string, notebookId: string, at: Date): Promise<void> {
  await exec.update(notebooks).set({ updatedAt: at }).where(and(eq(notebooks.workspaceId, workspaceId), eq(notebooks.id, notebookId)));
}

export const isKind = (k: string): k is NbCellKind => (CELL_KINDS as readonly string[]).includes(k);
