/**
 * The notebook screen's first paint in one answer (shared/api/notebook-page.ts). Model checks run
 * on the compute pool and are remembered by program and data (datasets never change under an id),
 * so opening a notebook again costs database reads only.
 */
import { createHash } from 'node:crypto';
import type { NotebookPageResponse } from '../../shared/api/notebook-page';
import { dataContentSchema, datasetIdOf, type CellContent, type CompileResponse } from '../../shared/api/notebook';
import type { Exec } from '../lib/audit';
import { findNotebook, notebookCells, toNotebook } from '../routes/notebooks';
import { loadComments, toComment } from '../routes/comments';
import { boundByName, datasetMetas, datasetPreview, loadDataTables, toDataset, type DatasetMeta } from './datasets';
import { checkModelOffThread } from './checks';
import { tablesNamed } from './model';
import { cellsRuns } from '../runs/read';

const CHECK_CACHE = 256;
const checks = new Map<string, Promise<CompileResponse>>();

/** The model check of a program against these tables, remembered (least recently used leave first). */
function cachedCheck(exec: Exec, source: string, bound: Map<string, DatasetMeta>): Promise<CompileResponse> {
  const wanted = tablesNamed(source);
  const used = [...bound.values()].filter((d) => wanted.includes(d.name));
  const key = createHash('sha256')
    .update(JSON.stringify([source, used.map((d) => [d.name, d.id]).sort()]))
    .digest('hex');
  let p = checks.get(key);
  if (p) {
    checks.delete(key);
    checks.set(key, p);
    return p;
  }
  p = loadDataTables(exec, used).then(async (tables) => (await checkModelOffThread(source, tables, true)).response);
  checks.set(key, p);
  p.catch(() => checks.delete(key));
  while (checks.size > CHECK_CACHE) checks.delete(checks.keys().next().value!);
  return p;
}

export async function notebookPage(exec: Exec, ws: { id: string; role: NotebookPageResponse['detail']['role']; name: string }, notebookId: string, now: Date): Promise<NotebookPageResponse> {
  // A handful of reads whatever the notebook's size: the notebook and its cells together, then the
  // data cells' tables in one read, every fit cell's runs in one (with one read of their
  // summaries), the comments; table previews and model checks come from their caches.
  const [nb, cells] = await Promise.all([findNotebook(exec, ws.id, notebookId), notebookCells(exec, ws.id, notebookId)]);
  const dataCellIds = cells.filter((c) => c.kind === 'data').map((c) => datasetIdOf(c.content as CellContent));
  const metas = await datasetMetas(exec, ws.id, dataCellIds.filter((x): x is string => typeof x === 'string'));
  const bound = boundByName(dataCellIds, metas);
  const datasetIds = [
    ...new Set(
      cells
        .filter((c) => c.kind === 'data')
        .map((c) => dataContentSchema.safeParse(c.content))
        .flatMap((p) => (p.success && p.data.datasetId ? [p.data.datasetId] : [])),
    ),
  ];
  const [datasets, modelChecks, runs, comments] = await Promise.all([
    Promise.all(
      datasetIds.map(async (id) => {
        const d = metas.get(id);
        if (!d) return []; // a deleted dataset: the cell asks for it and shows why
        try {
          return [{ dataset: toDataset(d), rows: await datasetPreview(exec, d) }];
        } catch {
          return [];
        }
      }),
    ).then((xs) => xs.flat()),
    Promise.all(
      cells
        .filter((c) => c.kind === 'model' && c.source.trim().length > 0)
        .map(async (c) => {
          try {
            return [{ cellId: c.id, source: c.source, check: await cachedCheck(exec, c.source, bound) }];
          } catch {
            return []; // past the check's time limit: the cell asks again and shows why
          }
        }),
    ).then((xs) => xs.flat()),
    cellsRuns(
      exec,
      ws.id,
      nb.id,
      cells.filter((c) => c.kind === 'fit').map((c) => c.id),
      now,
    ),
    loadComments(exec, ws.id, nb.id),
  ]);
  return {
    detail: { notebook: toNotebook(nb), cells, role: ws.role, workspaceName: ws.name },
    datasets,
    modelChecks,
    cellRuns: runs,
    comments: comments.map(toComment),
  };
}
