/**
 * The notebook screen's first paint in one answer (shared/api/notebook-page.ts). Model checks run
 * on the compute pool and are remembered by program and data (datasets never change under an id),
 * so opening a notebook again costs database reads only.
 */
import { createHash } from 'node:crypto';
import type { NotebookPageResponse } from '../../shared/api/notebook-page';
import { dataContentSchema, type CompileResponse } from '../../shared/api/notebook';
import type { Exec } from '../lib/audit';
import { findNotebook, notebookCells, toNotebook } from '../routes/notebooks';
import { loadComments, toComment } from '../routes/comments';
import { datasetPreview, findDataset, loadDataTables, notebookTables, toDataset, type DatasetMeta } from './datasets';
import { checkModelOffThread } from './checks';
import { tablesNamed } from './model';
import { cellRuns } from '../runs/read';

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
  const nb = await findNotebook(exec, ws.id, notebookId);
  const cells = await notebookCells(exec, ws.id, nb.id);
  const bound = await notebookTables(exec, ws.id, nb.id);
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
        try {
          const d = await findDataset(exec, ws.id, id);
          return [{ dataset: toDataset(d), rows: await datasetPreview(exec, d) }];
        } catch {
          return []; // a deleted dataset: the cell asks for it and shows why
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
    Promise.all(cells.filter((c) => c.kind === 'fit').map(async (c) => ({ cellId: c.id, runs: await cellRuns(exec, ws.id, nb.id, c.id, now) }))),
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
