/**
 * The model check for the editor's side panel: POST /api/workspaces/:id/compile (editors). The
 * tables are parsed and the model checked on compute threads (server/compute).
 */
import { Router } from 'express';
import { and, desc, eq } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import type { AppContext } from '../context';
import { datasets } from '../db/schema';
import { mount } from '../http/route';
import { datasetMetaColumns, loadDataTables, notebookTables, type DatasetMeta } from '../notebook/datasets';
import { checkModelOffThread } from '../notebook/checks';
import { tablesNamed } from '../notebook/model';
import { findNotebook } from './notebooks';
import { findCell } from '../notebook/cells';
import { notFound } from '../http/errors';

export function compileRouter(ctx: AppContext): Router {
  const r = Router();
  const { db } = ctx;

  mount(r, ctx, routes.compileModel, async ({ body }, req) => {
    const ws = req.workspace!;
    let bound: Map<string, DatasetMeta>;
    if (body.notebookId) {
      await findNotebook(db, ws.id, body.notebookId);
      bound = await notebookTables(db, ws.id, body.notebookId);
    } else {
      // Only the tables the program names: a first pass without data tells which.
      const names = tablesNamed(body.source);
      bound = new Map();
      for (const name of names) {
        const [row] = await db.select(datasetMetaColumns).from(datasets).where(and(eq(datasets.workspaceId, ws.id), eq(datasets.name, name))).orderBy(desc(datasets.createdAt)).limit(1);
        if (row) bound.set(name, row);
      }
    }
    const wanted = tablesNamed(body.source);
    const tables = await loadDataTables(db, [...bound.values()].filter((d) => wanted.includes(d.name)));
    return (await checkModelOffThread(body.source, tables, body.region ?? true)).response;
  });

  // A share-link reader's side panel: only the notebook's own model cells, as stored.
  mount(r, ctx, routes.sharedModelCheck, async ({ params }, req) => {
    const share = req.share!;
    const cell = await findCell(db, share.workspaceId, share.notebookId, params.cellId);
    if (cell.kind !== 'model') throw notFound('No model cell here');
    const bound = await notebookTables(db, share.workspaceId, share.notebookId);
    const wanted = tablesNamed(cell.source);
    const tables = await loadDataTables(db, [...bound.values()].filter((d) => wanted.includes(d.name)));
    return (await checkModelOffThread(cell.source, tables, true)).response;
  });

  return r;
}
