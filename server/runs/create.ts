/**
 * Queuing and cancelling runs: the checks a fit must pass before it is queued (a fit cell, a model
 * cell, the tables it binds, no problems, the unknowns and stored-numbers limits, the workspace's
 * limit of concurrent fits), then the queued row. Routes call these; the run worker never does.
 */
import { createHash } from 'node:crypto';
import { and, eq } from 'drizzle-orm';
import { fitContentSchema, RUN_LIMITS, WORKSPACE_CONCURRENT_RUNS, type Run } from '../../shared/api/notebook';
import { FIT_LIMITS, type FitSettings } from '../../shared/fit';
import type { Db } from '../db/client';
import { cells, runs, runUnits, workspaces } from '../db/schema';
import { DomainError } from '../lib/errors';
import { newId } from '../lib/ids';
import { findCell } from '../notebook/cells';
import { loadDataTables, notebookTables } from '../notebook/datasets';
import { checkModelOffThread } from '../notebook/checks';
import { firstProblem, tablesNamed } from '../notebook/model';
import { findRun } from './read';
import { activeRunCount, cancelRun, type RunSpec } from './queue';
import { unitsFor } from './units';
import { computePool } from '../compute/pool';
import type { PilotFitOutput } from '../compute/tasks';
import type { DataTables } from '../engine/types';
import type { FitPlan } from '../engine/fit';

export interface QueueRequest {
  workspaceId: string;
  notebookId: string;
  /** The fit cell. */
  cellId: string;
  userId: string;
  /** Settings to run with; the fit cell's saved settings when absent. */
  settings?: FitSettings;
  /** The model cell to fit; the one the fit cell names when absent. */
  modelCellId?: string;
  /** Longest a chain may run (seconds); RUN_LIMITS.wallSeconds when absent. */
  chainSeconds?: number;
}

/** Round down to two significant digits (a suggestion, not a promise). */
function roundDown2(n: number): number {
  if (n < 100) return Math.floor(n);
  const p = 10 ** (Math.floor(Math.log10(n)) - 1);
  return Math.floor(n / p) * p;
}

const secondsText = (s: number) => (s >= 120 ? `${Math.round(s / 60).toLocaleString('en')} min` : `${s >= 10 ? Math.round(s) : s.toPrecision(2)} s`);

/**
 * Refuse a fit whose chains cannot finish within the time limit, from a short timed pilot on the
 * compute pool (the engine the fit will run, one chain lengthened until it is measurable), saying
 * how many iterations per chain would fit. An estimate that cannot be made (the pilot failed or
 * timed out) refuses nothing; the limit still holds while the fit runs. Returns the engine plan.
 */
async function estimateOrRefuse(source: string, tables: DataTables, settings: FitSettings, limitSeconds: number): Promise<FitPlan | null> {
  let pilot: PilotFitOutput;
  try {
    pilot = await computePool().run('pilotFit', { source, tables, settings });
  } catch {
    return null;
  }
  const iterations = settings.warmup + settings.draws;
  const perChain = pilot.secondsPerIteration * iterations;
  if (perChain <= limitSeconds) return pilot.plan;
  // Leave a fifth of the limit as a margin for a busier machine than the pilot's.
  const fits = roundDown2((0.8 * limitSeconds) / pilot.secondsPerIteration);
  const speed = `about ${(pilot.secondsPerIteration * 1000).toPrecision(2)} ms per iteration in a short pilot with ${pilot.plan.sampler}`;
  const advice =
    fits >= FIT_LIMITS.warmup.min + FIT_LIMITS.draws.min
      ? `At this model's speed at most ~${fits.toLocaleString('en')} iterations per chain (warm-up + draws) would fit.`
      : 'This model is too slow to fit within the limit even with the fewest iterations allowed.';
  throw invalid(
    `This fit would take about ${secondsText(perChain)} per chain (${iterations.toLocaleString('en')} iterations, ${speed}); a chain may run at most ${secondsText(limitSeconds)}. ${advice}`,
    { settings: advice },
  );
}

const invalid = (message: string, fields?: Record<string, string>) => new DomainError('invalid', message, fields);

/** Check a fit cell's model and data and queue a run of it. */
export async function queueRun(db: Db, now: Date, q: QueueRequest): Promise<Run> {
  const cell = await findCell(db, q.workspaceId, q.notebookId, q.cellId);
  if (cell.kind !== 'fit') throw invalid('Only fit cells run fits');
  const content = fitContentSchema.parse(cell.content);
  const settings = q.settings ?? content.settings;
  const modelCellId = q.modelCellId ?? content.modelCellId;
  if (!modelCellId) throw invalid('Choose the model cell this fit uses first', { modelCellId: 'Required' });
  const [model] = await db
    .select()
    .from(cells)
    .where(and(eq(cells.workspaceId, q.workspaceId), eq(cells.notebookId, q.notebookId), eq(cells.id, modelCellId)))
    .limit(1);
  if (!model || model.kind !== 'model') throw invalid('The model cell this fit names no longer exists; choose another');

  const bound = await notebookTables(db, q.workspaceId, q.notebookId);
  const named = tablesNamed(model.source);
  const missing = named.filter((t) => !bound.has(t));
  if (missing.length) {
    throw invalid(`The model binds ${missing.map((t) => `table "${t}"`).join(' and ')}, but no data cell in this notebook holds a table by that name.`);
  }
  const used = named.map((t) => bound.get(t)!);
  const tables = await loadDataTables(db, used);
  const m = await checkModelOffThread(model.source, tables, false);
  const problem = firstProblem(m.response);
  if (problem) throw invalid(`The model has a problem at ${problem}`);
  const dim = m.dim;
  if (dim === 0) throw invalid('The model has no unknowns to fit');
  if (dim > FIT_LIMITS.dimension) throw invalid(`The model has ${dim} unknown coordinates; a fit allows at most ${FIT_LIMITS.dimension}.`);
  const stored = settings.chains * settings.draws * (dim + m.derivedNames.length);
  if (stored > RUN_LIMITS.storedNumbers) {
    throw invalid(
      `This fit would keep ${stored.toLocaleString('en')} numbers (chains × draws × quantities); the limit is ${RUN_LIMITS.storedNumbers.toLocaleString('en')}. Use fewer draws or chains.`,
    );
  }
  const plan = await estimateOrRefuse(model.source, tables, settings, q.chainSeconds ?? RUN_LIMITS.wallSeconds);
  const spec: RunSpec = { source: model.source, tables: Object.fromEntries(used.map((d) => [d.name, d.id])) };
  const modelHash = createHash('sha256')
    .update(JSON.stringify({ source: spec.source, tables: Object.entries(spec.tables).sort() }))
    .digest('hex');
  const id = newId();
  await db.transaction(async (tx) => {
    // Lock the workspace row so two submissions cannot both pass the concurrency check.
    await tx.select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.id, q.workspaceId)).for('update');
    const active = await activeRunCount(tx, q.workspaceId);
    if (active >= WORKSPACE_CONCURRENT_RUNS) {
      throw new DomainError('conflict', `This workspace already has ${active} fits queued or running (the limit is ${WORKSPACE_CONCURRENT_RUNS}). Wait for one to finish or cancel one.`);
    }
    const row = {
      id, workspaceId: q.workspaceId, notebookId: q.notebookId, cellId: cell.id, status: 'queued' as const, settings, seed: settings.seed,
      modelHash, spec, progress: [], attempts: 0, requestedBy: q.userId, createdAt: now, ...(plan ? { plan } : {}),
    };
    await tx.insert(runs).values(row);
    // One claimable unit per chain (units.ts): slots anywhere take them one by one.
    await tx.insert(runUnits).values(unitsFor(row));
  });
  const { row: _row, ...out } = await findRun(db, q.workspaceId, id, now);
  return out;
}


/** Cancel a queued or running run; a finished one is a conflict. */
export async function cancelQueuedOrRunning(db: Db, now: Date, workspaceId: string, runId: string): Promise<Run> {
  const before = await findRun(db, workspaceId, runId, now);
  if (!(await cancelRun(db, workspaceId, runId, now))) {
    throw new DomainError('conflict', `This fit has already ${before.status === 'done' ? 'finished' : before.status}; there is nothing to cancel.`);
  }
  const { row: _row, ...run } = await findRun(db, workspaceId, runId, now);
  return run;
}
