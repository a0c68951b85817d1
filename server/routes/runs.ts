/**
 * Runs: queue a fit from a fit cell, follow its progress, cancel it, list a cell's past runs,
 * fetch draws for plots, and export draws and summary as CSV. The fitting itself happens in the
 * run workers (server/jobs).
 */
import { createHash } from 'node:crypto';
import { Router, type Response } from 'express';
import { and, eq } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import { fitContentSchema, RUN_LIMITS, WORKSPACE_CONCURRENT_RUNS } from '../../shared/api/notebook';
import { FIT_LIMITS, type FitSummary } from '../../shared/fit';
import { summaryCsv } from '../../shared/export-csv';
import type { AppContext } from '../context';
import { cells, runs, workspaces } from '../db/schema';
import { mount } from '../http/route';
import { badRequest, conflict, notFound } from '../http/errors';
import { newId } from '../lib/ids';
import { findCell } from '../notebook/cells';
import { loadDataTables, notebookTables } from '../notebook/datasets';
import { checkModelOffThread } from '../notebook/checks';
import { firstProblem, tablesNamed } from '../notebook/model';
import { cellRuns, findRun, runDraws, runDrawsCsv } from '../notebook/runs';
import { activeRunCount, cancelRun, type RunSpec } from '../jobs/queue';

const DEFAULT_PLOT_DRAWS = 1000;

function sendCsv(res: Response, fileName: string): void {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
}

export function runsRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.createRun, async ({ params, body }, req) => {
    const ws = req.workspace!;
    const cell = await findCell(db, ws.id, params.notebookId, params.cellId);
    if (cell.kind !== 'fit') throw badRequest('Only fit cells run fits');
    const content = fitContentSchema.parse(cell.content);
    const settings = body.settings ?? content.settings;
    const modelCellId = body.modelCellId ?? content.modelCellId;
    if (!modelCellId) throw badRequest('Choose the model cell this fit uses first', { modelCellId: 'Required' });
    const [model] = await db
      .select()
      .from(cells)
      .where(and(eq(cells.workspaceId, ws.id), eq(cells.notebookId, params.notebookId), eq(cells.id, modelCellId)))
      .limit(1);
    if (!model || model.kind !== 'model') throw badRequest('The model cell this fit names no longer exists; choose another');

    const bound = await notebookTables(db, ws.id, params.notebookId);
    const named = tablesNamed(model.source);
    const missing = named.filter((t) => !bound.has(t));
    if (missing.length) {
      throw badRequest(`The model binds ${missing.map((t) => `table "${t}"`).join(' and ')}, but no data cell in this notebook holds a table by that name.`);
    }
    const used = named.map((t) => bound.get(t)!);
    const m = await checkModelOffThread(model.source, await loadDataTables(db, used), false);
    const problem = firstProblem(m.response);
    if (problem) throw badRequest(`The model has a problem at ${problem}`);
    const dim = m.dim;
    if (dim === 0) throw badRequest('The model has no unknowns to fit');
    if (dim > FIT_LIMITS.dimension) throw badRequest(`The model has ${dim} unknown coordinates; a fit allows at most ${FIT_LIMITS.dimension}.`);
    const stored = settings.chains * settings.draws * (dim + m.derivedNames.length);
    if (stored > RUN_LIMITS.storedNumbers) {
      throw badRequest(
        `This fit would keep ${stored.toLocaleString('en')} numbers (chains × draws × quantities); the limit is ${RUN_LIMITS.storedNumbers.toLocaleString('en')}. Use fewer draws or chains.`,
      );
    }
    const spec: RunSpec = { source: model.source, tables: Object.fromEntries(used.map((d) => [d.name, d.id])) };
    const modelHash = createHash('sha256')
      .update(JSON.stringify({ source: spec.source, tables: Object.entries(spec.tables).sort() }))
      .digest('hex');
    const now = clock.now();
    const id = newId();
    await db.transaction(async (tx) => {
      // Lock the workspace row so two submissions cannot both pass the concurrency check.
      await tx.select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.id, ws.id)).for('update');
      const active = await activeRunCount(tx, ws.id);
      if (active >= WORKSPACE_CONCURRENT_RUNS) {
        throw conflict(`This workspace already has ${active} fits queued or running (the limit is ${WORKSPACE_CONCURRENT_RUNS}). Wait for one to finish or cancel one.`);
      }
      await tx.insert(runs).values({
        id, workspaceId: ws.id, notebookId: params.notebookId, cellId: cell.id, status: 'queued', settings, seed: settings.seed,
        modelHash, spec, progress: [], attempts: 0, requestedBy: req.user!.id, createdAt: now,
      });
    });
    const run = await findRun(db, ws.id, id, clock.now());
    const { row: _row, ...out } = run;
    return { run: out };
  });

  mount(r, ctx, routes.listCellRuns, async ({ params }, req) => {
    const ws = req.workspace!;
    await findCell(db, ws.id, params.notebookId, params.cellId);
    return { runs: await cellRuns(db, ws.id, params.notebookId, params.cellId, clock.now()) };
  });

  mount(r, ctx, routes.getRun, async ({ params }, req) => {
    const { row: _row, ...run } = await findRun(db, req.workspace!.id, params.runId, clock.now());
    return { run };
  });

  mount(r, ctx, routes.cancelRun, async ({ params }, req) => {
    const ws = req.workspace!;
    const before = await findRun(db, ws.id, params.runId, clock.now());
    if (!(await cancelRun(db, ws.id, params.runId, clock.now()))) {
      throw conflict(`This fit has already ${before.status === 'done' ? 'finished' : before.status}; there is nothing to cancel.`);
    }
    const { row: _row, ...run } = await findRun(db, ws.id, params.runId, clock.now());
    return { run };
  });

  mount(r, ctx, routes.getRunDraws, async ({ params, query }, req) => {
    const run = await findRun(db, req.workspace!.id, params.runId, clock.now());
    if (run.status !== 'done') throw notFound('This run has no draws yet');
    return runDraws(db, run.row, query.max ?? DEFAULT_PLOT_DRAWS);
  });

  mount(r, ctx, routes.exportRunDraws, async ({ params }, req, res) => {
    const ws = req.workspace!;
    const run = await findRun(db, ws.id, params.runId, clock.now());
    if (run.status !== 'done') throw notFound('This run has no draws yet');
    const csv = await runDrawsCsv(db, ws.id, run.id);
    sendCsv(res, `draws-${run.id}.csv`);
    res.status(200).end(Buffer.from(csv.buffer, csv.byteOffset, csv.byteLength));
  });

  mount(r, ctx, routes.exportRunSummary, async ({ params }, req, res) => {
    const run = await findRun(db, req.workspace!.id, params.runId, clock.now());
    if (!run.summary) throw notFound('This run has no summary yet');
    sendCsv(res, `summary-${run.id}.csv`);
    res.status(200).send(summaryCsv((run.summary as FitSummary).quantities));
  });

  // ---- share-link readers ----
  mount(r, ctx, routes.sharedCellRuns, async ({ params }, req) => {
    const share = req.share!;
    await findCell(db, share.workspaceId, share.notebookId, params.cellId);
    return { runs: (await cellRuns(db, share.workspaceId, share.notebookId, params.cellId, clock.now())).filter((x) => x.status === 'done') };
  });

  mount(r, ctx, routes.sharedRunDraws, async ({ params, query }, req) => {
    const share = req.share!;
    const run = await findRun(db, share.workspaceId, params.runId, clock.now());
    if (run.notebookId !== share.notebookId || run.status !== 'done') throw notFound('Run not found');
    return runDraws(db, run.row, query.max ?? DEFAULT_PLOT_DRAWS);
  });

  return r;
}
