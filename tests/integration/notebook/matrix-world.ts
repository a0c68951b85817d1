/**
 * The notebook's rows for one cell of the role matrix: a notes cell, a data cell with its dataset,
 * a model and a fit cell, a finished run (chains and summary stored as a worker would), a queued
 * run and a comment.
 */
import type { Db } from '../../../server/db/client';
import { cells, comments, datasets, runs } from '../../../server/db/schema';
import { newId } from '../../../server/lib/ids';
import { finishRun } from '../../../server/runs/queue';
import { compareRunValues } from '../../../server/runs/compare-job';
import { compareContentSchema } from '../../../shared/api/compare';
import { readUpload } from '../../../server/notebook/datasets';
import type { FitSummary } from '../../../shared/fit';

export interface NotebookMatrixWorld {
  notesCell: string;
  dataset: string;
  fitCell: string;
  modelCell: string;
  doneRun: string;
  queuedRun: string;
  compareCell: string;
  queuedCompare: string;
  comment: string;
}

export function csvForm(text: string, fields: Record<string, string>, fileName = 'data.csv'): FormData {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  form.set('file', new Blob([text], { type: fileName.endsWith('.json') ? 'application/json' : 'text/csv' }), fileName);
  return form;
}

const settings = { chains: 1, warmup: 50, draws: 50, seed: 1, sampler: 'auto' as const };

/** A summary that satisfies the shared schema, for a stored run of one unknown `a`. */
const summary: FitSummary = {
  quantities: [{ name: 'a', kind: 'unknown', mean: 0.5, sd: 0.1, q5: 0.3, q50: 0.5, q95: 0.7, rhat: 1, essBulk: 40, essTail: 40, mcseMean: 0.01, mcseQ5: 0.02, mcseQ50: 0.02, mcseQ95: 0.02 }],
  diagnostics: { divergences: 0, acceptance: 0.8, stepSize: 0.5, maxRhat: 1, minEssBulk: 40, minEssTail: 40, samplerUsed: 'hitrun', samplerReason: 'stored for the role matrix' },
  verdict: { level: 'run-longer', reason: 'Few draws.', rules: [{ rule: 'ESS ≥ 100 per chain', passed: false, detail: '40' }] },
  settings,
  seconds: 0.01,
};

export async function notebookMatrixWorld(db: Db, ws: string, nb: string, ownerId: string, reviewerId: string, now: Date): Promise<NotebookMatrixWorld> {
  const notesCell = newId();
  const dataCell = newId();
  const modelCell = newId();
  const fitCell = newId();
  const dataset = newId();
  const csv = Buffer.from('a\n0.4\n0.6\n', 'utf8');
  const { columns, rows } = readUpload(csv);
  await db.insert(datasets).values({ id: dataset, workspaceId: ws, notebookId: nb, cellId: null, name: 'tiny', columns, rowCount: rows, bytes: csv.length, content: csv, createdBy: ownerId, createdAt: now });
  const base = { workspaceId: ws, notebookId: nb, version: 1, collapsed: false, createdBy: ownerId, updatedBy: ownerId, createdAt: now, updatedAt: now };
  await db.insert(cells).values([
    { ...base, id: notesCell, kind: 'notes', position: 1, source: 'Matrix notes', content: null },
    { ...base, id: dataCell, kind: 'data', position: 2, source: '', content: { datasetId: dataset } },
    { ...base, id: modelCell, kind: 'model', position: 3, source: 'unknown b\nterm ld_normal(b, 0, 1)\nconstrain b >= 0', content: null },
    { ...base, id: fitCell, kind: 'fit', position: 4, source: '', content: { modelCellId: modelCell, settings } },
  ]);
  const runRow = (id: string, status: 'queued' | 'running') => ({
    id, workspaceId: ws, notebookId: nb, cellId: fitCell, status, settings, seed: 1, modelHash: 'f'.repeat(64),
    spec: { source: 'unknown a\nconstrain a >= 0\nconstrain a <= 1', tables: {} }, progress: [], attempts: status === 'running' ? 1 : 0,
    leaseOwner: status === 'running' ? 'matrix' : null, leaseExpiresAt: status === 'running' ? new Date(now.getTime() + 60_000) : null,
    requestedBy: ownerId, createdAt: now, startedAt: status === 'running' ? now : null,
  });
  const doneRun = newId();
  const queuedRun = newId();
  await db.insert(runs).values([runRow(doneRun, 'running'), runRow(queuedRun, 'queued')]);
  const draws = new Float64Array([0.2, 0.5, 0.7]);
  const ok = await finishRun(
    db,
    { id: doneRun, workspaceId: ws },
    'matrix',
    {
      unknownNames: ['a'],
      derivedNames: [],
      chains: [{ chain: 0, draws, derivedDraws: new Float64Array(0), divergent: new Uint8Array(3), acceptStat: new Float64Array([1, 1, 1]), stepSize: NaN }],
      summary,
    },
    now,
    { fit: 1 },
  );
  if (!ok) throw new Error('could not store the matrix run');
  // A compare cell of the model and a queued comparison of it (compare-job.ts).
  const compareCell = newId();
  await db.insert(cells).values({ ...base, id: compareCell, kind: 'compare', position: 5, source: '', content: compareContentSchema.parse({ modelCellIds: [modelCell] }) });
  const queuedCompare = newId();
  await db.insert(runs).values(compareRunValues({
    id: queuedCompare, workspaceId: ws, notebookId: nb, cellId: compareCell, status: 'queued',
    settings: { modelCellIds: [modelCell], hypotheses: [], reference: null, priorOdds: [], replicates: 2, seed: 1, factors: [1] }, seed: 1, modelHash: 'c'.repeat(64),
    spec: { kind: 'compare', models: [{ cellId: modelCell, label: 'Matrix model', source: 'unknown b\nterm ld_normal(b, 0, 1)\nconstrain b >= 0', tables: {}, fitRunId: null }] },
    progress: null, attempts: 0, requestedBy: ownerId, createdAt: now,
  }));
  const comment = newId();
  await db.insert(comments).values({ id: comment, workspaceId: ws, notebookId: nb, cellId: notesCell, parentId: null, authorId: reviewerId, body: 'Why this prior?', resolved: false, createdAt: now, updatedAt: now });
  return { notesCell, dataset, fitCell, modelCell, doneRun, queuedRun, compareCell, queuedCompare, comment };
}
