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
import { cellRuns, findRun, runDraws, streamRunDrawsCsv, type DrawsBytes } from '../runs/read';
import { DRAWS_CONTENT_TYPE } from '../../shared/draws-binary';
import { cancelQueuedOrRunning, queueRun } from '../runs/create';
import { cancelCompare, cellCompareRuns, queueCompare } from '../runs/compare-job';
import { RunEventHub } from '../runs/events';
import { findNotebook } from './notebooks';

const DEFAULT_PLOT_DRAWS = 1000;

function sendDraws(res: Response, x: DrawsBytes): void {
  res.setHeader('Content-Type', DRAWS_CONTENT_TYPE);
  res.setHeader('Content-Length', String(x.head.byteLength + x.body.byteLength));
  // A finished run's draws never change.
  res.setHeader('Cache-Control', 'private, max-age=86400, immutable');
  res.status(200);
  res.write(x.head);
  res.end(x.body);
}

function sendCsv(res: Response, fileName: string): void {
  res.setHeader('Content-Type', 'text/csv; charset=utf-8');
  res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
}

export function runsRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.createRun, async ({ params, body }, req) => {
    const run = await queueRun(db, clock.now(), { workspaceId: req.workspace!.id, notebookId: params.notebookId, cellId: params.cellId, userId: req.user!.id, chainSeconds: ctx.config.runChainSeconds, ...body });
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

  mount(r, ctx, routes.getRunDraws, async ({ params, query }, req, res) => {
    const run = await findRun(db, req.workspace!.id, params.runId, clock.now());
    if (run.status !== 'done') throw notFound('This run has no draws yet');
    sendDraws(res, await runDraws(db, run.row, query.max ?? DEFAULT_PLOT_DRAWS));
  });

  mount(r, ctx, routes.exportRunDraws, async ({ params }, req, res) => {
    const ws = req.workspace!;
    const run = await findRun(db, ws.id, params.runId, clock.now());
    if (run.status !== 'done') throw notFound('This run has no draws yet');
    // Formatted in bounded pieces on the compute pool and written as they come, with backpressure.
    await streamRunDrawsCsv(db, ws.id, run.id, {
      begin: () => {
        sendCsv(res, `draws-${run.id}.csv`);
        res.status(200);
      },
      write: (bytes) =>
        new Promise<void>((resolve, reject) => {
          if (res.destroyed) return reject(new Error('the client went away'));
          if (res.write(bytes)) return resolve();
          const done = (err?: Error) => {
            res.off('drain', drained);
            res.off('close', closed);
            if (err) reject(err);
            else resolve();
          };
          const drained = () => done();
          const closed = () => done(new Error('the client went away'));
          res.once('drain', drained);
          res.once('close', closed);
        }),
      end: () => res.end(),
    }).catch((e: unknown) => {
      // Once bytes are out, a failure can only cut the file short: the client sees a broken download.
      if (!res.headersSent) throw e;
      res.destroy(e instanceof Error ? e : new Error(String(e)));
    });
  });

  mount(r, ctx, routes.exportRunSummary, async ({ params }, req, res) => {
    const run = await findRun(db, req.workspace!.id, params.runId, clock.now());
    if (!run.summary) throw notFound('This run has no summary yet');
    sendCsv(res, `summary-${run.id}.csv`);
    res.status(200).send(summaryCsv(run.summary.quantities));
  });

  // ---- events (server-sent) ----
  const hub = new RunEventHub({ db, clock });
  mount(r, ctx, routes.notebookEvents, async ({ params, query }, req, res) => {
    const ws = req.workspace!;
    await findNotebook(db, ws.id, params.notebookId);
    await hub.subscribe(res, ws.id, params.notebookId, { doneOnly: false, once: query.once === '1' });
  });
  mount(r, ctx, routes.sharedNotebookEvents, async ({ query }, req, res) => {
    const share = req.share!;
    await hub.subscribe(res, share.workspaceId, share.notebookId, { doneOnly: true, once: query.once === '1' });
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

  mount(r, ctx, routes.sharedRunDraws, async ({ params, query }, req, res) => {
    const share = req.share!;
    const run = await findRun(db, share.workspaceId, params.runId, clock.now());
    if (run.notebookId !== share.notebookId || run.status !== 'done') throw notFound('Run not found');
    sendDraws(res, await runDraws(db, run.row, query.max ?? DEFAULT_PLOT_DRAWS));
  });

  return r;
}
