/** Datasets: CSV upload (size-limited, parsed before anything is stored, kept as typed columns) and paged previews. */
import { Router } from 'express';
import { routes } from '../../shared/api/routes';
import { DATASET_MAX_BYTES, type PreviewValue } from '../../shared/api/notebook';
import type { AppContext } from '../context';
import { datasets } from '../db/schema';
import { mount } from '../http/route';
import { mountUpload } from '../http/upload';
import { notFound } from '../http/errors';
import { newId } from '../lib/ids';
import { datasetInNotebook, datasetPreview, findDataset, parseUpload, rememberTable, toDataset } from '../notebook/datasets';
import { previewOf } from '../notebook/tables';

const rowsPage = (d: { rowCount: number }, rows: PreviewValue[][], offset: number) => ({ offset, total: d.rowCount, rows });

export function datasetsRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mountUpload(r, ctx, routes.uploadDataset, { field: 'file', maxBytes: DATASET_MAX_BYTES, what: 'CSV file' }, async ({ body, file }, req) => {
    const ws = req.workspace!;
    const { table, columns, rows, stored } = await parseUpload(file.bytes);
    const row = {
      id: newId(),
      workspaceId: ws.id,
      notebookId: null,
      cellId: null,
      name: body.name,
      columns,
      rowCount: rows,
      bytes: file.size,
      content: file.bytes,
      tableColumns: stored,
      createdBy: req.user!.id,
      createdAt: clock.now(),
    };
    await db.insert(datasets).values(row);
    rememberTable(row, table);
    const { content: _c, tableColumns: _t, ...meta } = row;
    return { dataset: toDataset(meta), rows: previewOf(table, columns) };
  });

  mount(r, ctx, routes.getDataset, async ({ params }, req) => {
    const d = await findDataset(db, req.workspace!.id, params.datasetId);
    return { dataset: toDataset(d), rows: await datasetPreview(db, d) };
  });

  mount(r, ctx, routes.getDatasetRows, async ({ params, query }, req) => {
    const d = await findDataset(db, req.workspace!.id, params.datasetId);
    return rowsPage(d, await datasetPreview(db, d, query.limit, query.offset), query.offset);
  });

  mount(r, ctx, routes.sharedDatasetRows, async ({ params, query }, req) => {
    const share = req.share!;
    if (!(await datasetInNotebook(db, share.workspaceId, share.notebookId, params.datasetId))) throw notFound('Dataset not found');
    const d = await findDataset(db, share.workspaceId, params.datasetId);
    return rowsPage(d, await datasetPreview(db, d, query.limit, query.offset), query.offset);
  });

  mount(r, ctx, routes.sharedDataset, async ({ params }, req) => {
    const share = req.share!;
    if (!(await datasetInNotebook(db, share.workspaceId, share.notebookId, params.datasetId))) throw notFound('Dataset not found');
    const d = await findDataset(db, share.workspaceId, params.datasetId);
    const { workspaceId: _internal, ...dataset } = toDataset(d);
    return { dataset, rows: await datasetPreview(db, d) };
  });

  return r;
}
