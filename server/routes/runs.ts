/**
 * Runs: queue a fit from a fit cell, follow its progress, cancel it, list a cell's past runs,
 * fetch draws for plots, and export draws and summary as CSV. Thin wrappers over server/runs
 * (creating, reading, cancelling); the fitting itself happens in the run workers.
 */
import { Router, type Response } from 'express';
import { routes } from '../../shared/api/routes';
import { summaryCsv } from '../../shared/export-csv';
import type { AppContext } from '../context';
import { mount } from '../http/route';
import { notFound } from '../http/errors';
import { findCell } from '../notebook/cells';
import { cellRuns, findRun, runDraws, runDrawsCsv } from '../runs/read';
import { cancelQueuedOrRunning, queueRun } from '../runs/create';
import { cancelCompare, cellCompareRuns, queueCompare } from '../runs/compare-job';

const DEFAULT_PLOT_DRAWS = 1000;

function sendCsv(res: Response, fileName: string): void {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
}

export function runsRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.createRun, async ({ params, body }, req) => {
    const run = await queueRun(db, clock.now(), { workspaceId: req.workspace!.id, notebookId: params.notebookId, cellId: params.cellId, userId: req.user!.id, ...body });
    return { run };
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
    return { run: await cancelQueuedOrRunning(db, clock.now(), req.workspace!.id, params.runId) };
  });

  // ---- comparisons (compare cells) ----
  mount(r, ctx, routes.queueCompareRun, async ({ params, body }, req) => {
    const run = await queueCompare(db, clock.now(), { workspaceId: req.workspace!.id, notebookId: params.notebookId, cellId: params.cellId, userId: req.user!.id, sensitivity: body.sensitivity, content: body.content });
    return { run };
  });

  mount(r, ctx, routes.listCompareRuns, async ({ params }, req) => {
    const ws = req.workspace!;
    await findCell(db, ws.id, params.notebookId, params.cellId);
    return { runs: await cellCompareRuns(db, ws.id, params.notebookId, params.cellId, clock.now()) };
  });

  mount(r, ctx, routes.cancelCompareRun, async ({ params }, req) => {
    return { run: await cancelCompare(db, clock.now(), req.workspace!.id, params.runId) };
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
    res.status(200).send(summaryCsv(run.summary.quantities));
  });

  // ---- share-link readers ----
  mount(r, ctx, routes.sharedCellRuns, async ({ params }, req) => {
    const share = req.share!;
    await findCell(db, share.workspaceId, share.notebookId, params.cellId);
    return { runs: (await cellRuns(db, share.workspaceId, share.notebookId, params.cellId, clock.now())).filter((x) => x.status === 'done') };
  });

  mount(r, ctx, routes.sharedCompareRuns, async ({ params }, req) => {
    const share = req.share!;
    await findCell(db, share.workspaceId, share.notebookId, params.cellId);
    return { runs: (await cellCompareRuns(db, share.workspaceId, share.notebookId, params.cellId, clock.now())).filter((x) => x.status === 'done') };
  });

  mount(r, ctx, routes.sharedRunDraws, async ({ params, query }, req) => {
    const share = req.share!;
    const run = await findRun(db, share.workspaceId, params.runId, clock.now());
    if (run.notebookId !== share.notebookId || run.status !== 'done') throw notFound('Run not found');
    return runDraws(db, run.row, query.max ?? DEFAULT_PLOT_DRAWS);
  });

  return r;
}
