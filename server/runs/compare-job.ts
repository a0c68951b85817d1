/**
 * Compare jobs: the comparison a compare cell describes, as a run row like a fit.
 *
 * A compare job is a row of `runs` whose cell is the compare cell and whose spec says
 * `kind: 'compare'` (the spec freezes each model's source, its tables and the fit whose draws give
 * leave-one-out); its settings are the cell's content at queue time plus the prior scale factors.
 * It is queued as one unit of work (units.ts), claimed, leased, beaten and cancelled like a fit's
 * chain; the worker runs the job registered here (jobs.ts), which computes in a worker thread of
 * its own (compare-thread.ts) so the worker process's event loop keeps its heartbeats and writes
 * going, reports progress (which log Z, which replicate, which annealing stage) as the unit's
 * progress, and returns the result (shared/api/compare.ts compareResultSchema), stored as the run
 * summary.
 */
import { createHash } from 'node:crypto';
import { Worker } from 'node:worker_threads';
import { and, desc, eq, inArray } from 'drizzle-orm';
import { compareContentSchema, compareResultSchema, compareRunSchema, SENSITIVITY_FACTORS, type CompareProgress, type CompareResult, type CompareRun } from '../../shared/api/compare';
import { WORKSPACE_CONCURRENT_RUNS } from '../../shared/api/notebook';
import type { Db } from '../db/client';
import type { FitProgress, FitSummary } from '../../shared/fit';
import { cells, datasets, runChains, runs, runSummaries, runUnits, users, workspaces } from '../db/schema';
import type { Exec } from '../lib/audit';
import { DomainError } from '../lib/errors';
import { newId } from '../lib/ids';
import { findCell } from '../notebook/cells';
import { datasetMetaColumns, loadDataTables, notebookTables } from '../notebook/datasets';
import { tablesNamed } from '../notebook/model';
import type { ChainStats, RunRow } from './queue';
import { activeRunCount, cancelRun, queuePositions } from './queue';
import { cellRunRows, workerLost } from './read';
import type { CompareThreadInput, CompareThreadMessage, StoredFitRows } from './compare-thread';
import { registerWholeRunJob } from './jobs';
import { unitsFor, unitsOf, type UnitRow } from './units';

const THREAD_BOOT = new URL('./compare-thread-boot.mjs', import.meta.url);

export interface CompareSpecModel {
  cellId: string;
  label: string;
  source: string;
  /** Table name → dataset id. */
  tables: Record<string, string>;
  /** The newest finished fit of this very source and tables, when there was one at queue time. */
  fitRunId: string | null;
}

export interface CompareSpec {
  kind: 'compare';
  models: CompareSpecModel[];
}

export type CompareSettings = CompareRun['settings'];

/**
 * The runs columns are typed for fits (server/db/schema.ts); a compare row keeps its own shapes in
 * them (settings: CompareSettings, spec: CompareSpec, progress: CompareProgress, summary:
 * CompareResult), written and read back only here.
 */
type RunInsert = typeof runs.$inferInsert;
export function compareRunValues(v: Omit<RunInsert, 'settings' | 'spec' | 'progress'> & { settings: CompareSettings; spec: CompareSpec; progress: CompareProgress | null }): RunInsert {
  return v as unknown as RunInsert;
}

export function isCompareSpec(spec: unknown): spec is CompareSpec {
  return !!spec && typeof spec === 'object' && (spec as { kind?: unknown }).kind === 'compare';
}

/** The hash a fit of this source and tables carries (as create.ts computes it). */
export function fitModelHash(source: string, tables: Record<string, string>): string {
  return createHash('sha256')
    .update(JSON.stringify({ source, tables: Object.entries(tables).sort() }))
    .digest('hex');
}

/** A model cell's name in the comparison: its first comment line, else its place in the notebook. */
export function modelLabel(source: string, position: number): string {
  for (const line of source.split('\n')) {
    const t = line.trim();
    if (!t) continue;
    const m = t.match(/^#+\s*(.+)$/);
    if (m) return m[1].trim().slice(0, 80);
    break;
  }
  return `Model cell ${position + 1}`;
}

const invalid = (message: string, fields?: Record<string, string>) => new DomainError('invalid', message, fields);

/* -------------------------------------------------------------------------------------------- */
/* Queue                                                                                          */
/* -------------------------------------------------------------------------------------------- */

export interface QueueCompareRequest {
  workspaceId: string;
  notebookId: string;
  cellId: string;
  userId: string;
  sensitivity: boolean;
  /** Settings to run with instead of the cell's saved content. */
  content?: unknown;
}

/** The spec and settings of a compare cell as it is now (models, their tables and matching fits). */
export async function compareSpecOf(db: Exec, workspaceId: string, notebookId: string, content: unknown, sensitivity: boolean): Promise<{ spec: CompareSpec; settings: CompareSettings }> {
  const c = compareContentSchema.parse(content);
  if (c.modelCellIds.length === 0) throw invalid('Pick at least one model cell to compare', { modelCellIds: 'Required' });
  for (const h of c.hypotheses) {
    if (!c.modelCellIds.includes(h.modelCellId)) throw invalid('A hypothesis names a model cell that is not picked for the comparison');
  }
  const models = await db
    .select()
    .from(cells)
    .where(and(eq(cells.workspaceId, workspaceId), eq(cells.notebookId, notebookId), inArray(cells.id, c.modelCellIds)));
  const bound = await notebookTables(db, workspaceId, notebookId);
  const out: CompareSpecModel[] = [];
  for (const id of c.modelCellIds) {
    const m = models.find((x) => x.id === id);
    if (!m || m.kind !== 'model') throw invalid('A model cell this comparison names no longer exists; pick the models again');
    const named = tablesNamed(m.source);
    const missing = named.filter((t) => !bound.has(t));
    const label = modelLabel(m.source, m.position);
    if (missing.length) throw invalid(`'${label}' binds ${missing.map((t) => `table "${t}"`).join(' and ')}, but no data cell in this notebook holds a table by that name.`);
    const tables = Object.fromEntries(named.map((t) => [t, bound.get(t)!.id]));
    const hash = fitModelHash(m.source, tables);
    // The newest finished fit of the posterior (a prior-only fit of the same model has the same hash).
    const fits = await db
      .select({ id: runs.id, spec: runs.spec, settings: runs.settings })
      .from(runs)
      .where(and(eq(runs.workspaceId, workspaceId), eq(runs.notebookId, notebookId), eq(runs.modelHash, hash), eq(runs.status, 'done')))
      .orderBy(desc(runs.finishedAt), desc(runs.id))
      .limit(20);
    const fit = fits.find((f) => !isCompareSpec(f.spec) && !(f.settings as { priorOnly?: boolean } | null)?.priorOnly);
    out.push({ cellId: m.id, label, source: m.source, tables, fitRunId: fit ? fit.id : null });
  }
  return { spec: { kind: 'compare', models: out }, settings: { ...c, factors: sensitivity ? [1, ...SENSITIVITY_FACTORS] : [1] } };
}

/** Queue the comparison a compare cell describes. */
export async function queueCompare(db: Db, now: Date, q: QueueCompareRequest): Promise<CompareRun> {
  const cell = await findCell(db, q.workspaceId, q.notebookId, q.cellId);
  if (cell.kind !== 'compare') throw invalid('Only compare cells run comparisons');
  const { spec, settings } = await compareSpecOf(db, q.workspaceId, q.notebookId, q.content ?? cell.content, q.sensitivity);
  const id = newId();
  const hash = createHash('sha256').update(JSON.stringify({ spec, settings })).digest('hex');
  await db.transaction(async (tx) => {
    await tx.select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.id, q.workspaceId)).for('update');
    // Comparisons have a limit of their own, apart from the fits' (queue.ts activeRunCount).
    const active = await activeRunCount(tx, q.workspaceId, 'compare');
    if (active >= WORKSPACE_CONCURRENT_RUNS) {
      throw new DomainError('conflict', `This workspace already has ${active} comparisons queued or running (the limit is ${WORKSPACE_CONCURRENT_RUNS}). Wait for one to finish or cancel one.`);
    }
    const row = compareRunValues({
      id, workspaceId: q.workspaceId, notebookId: q.notebookId, cellId: cell.id, status: 'queued', settings, seed: settings.seed,
      modelHash: hash, spec, progress: null, attempts: 0, requestedBy: q.userId, createdAt: now,
    });
    await tx.insert(runs).values(row);
    await tx.insert(runUnits).values(unitsFor({ id, workspaceId: q.workspaceId, createdAt: now, settings: row.settings, spec: row.spec ?? null }));
  });
  return findCompareRun(db, q.workspaceId, id, now);
}

/* -------------------------------------------------------------------------------------------- */
/* Read                                                                                           */
/* -------------------------------------------------------------------------------------------- */

/** A running comparison's progress and liveness come from its one unit (units.ts). */
function toCompareRun(r: RunRow, result: CompareResult | null, name: string | null, now: Date, positions?: Map<string, number>, unit?: UnitRow): CompareRun {
  const raw = unit ? unit.progress : r.progress;
  const progress = raw && !Array.isArray(raw) ? (raw as unknown as CompareProgress) : null;
  return {
    id: r.id,
    cellId: r.cellId ?? null,
    notebookId: r.notebookId,
    status: r.status,
    settings: compareRunSchema.shape.settings.parse(r.settings),
    createdBy: r.requestedBy && name !== null ? { id: r.requestedBy, name } : null,
    createdAt: r.createdAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
    error: r.error ?? null,
    progress: r.status === 'running' ? progress : null,
    result,
    worker: r.status === 'running' ? (workerLost(unit ?? r, now) ? 'lost' : 'active') : null,
    queuePosition: r.status === 'queued' ? (positions?.get(r.id) ?? null) : null,
  };
}

async function withResults(exec: Exec, rows: { r: RunRow; name: string | null }[], now: Date): Promise<CompareRun[]> {
  const ids = rows.filter((x) => x.r.status === 'done').map((x) => x.r.id);
  const sums = ids.length ? await exec.select().from(runSummaries).where(inArray(runSummaries.runId, ids)) : [];
  const byId = new Map(sums.map((s) => [s.runId, compareResultSchema.safeParse(s.summary)]));
  const positions = rows.some((x) => x.r.status === 'queued') ? await queuePositions(exec, now) : undefined;
  const units = new Map<string, UnitRow>((await unitsOf(exec, rows.filter((x) => x.r.status === 'running').map((x) => x.r.id))).map((u) => [u.runId, u]));
  return rows.map((x) => {
    const p = byId.get(x.r.id);
    return toCompareRun(x.r, p?.success ? p.data : null, x.name, now, positions, units.get(x.r.id));
  });
}

export async function findCompareRun(exec: Exec, workspaceId: string, runId: string, now = new Date()): Promise<CompareRun> {
  const [x] = await exec
    .select({ r: runs, name: users.name })
    .from(runs)
    .leftJoin(users, eq(users.id, runs.requestedBy))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, runId)))
    .limit(1);
  if (!x || !isCompareSpec(x.r.spec)) throw new DomainError('not_found', 'Comparison not found');
  return (await withResults(exec, [x], now))[0];
}

/** The compare jobs of a compare cell, newest first. */
export async function cellCompareRuns(exec: Exec, workspaceId: string, notebookId: string, cellId: string, now = new Date(), limit = 20): Promise<CompareRun[]> {
  const rows = await cellRunRows(exec, workspaceId, notebookId, cellId, limit);
  return withResults(exec, rows.filter((x) => isCompareSpec(x.r.spec)), now);
}

export async function cancelCompare(db: Db, now: Date, workspaceId: string, runId: string): Promise<CompareRun> {
  const before = await findCompareRun(db, workspaceId, runId, now);
  if (!(await cancelRun(db, workspaceId, runId, now))) {
    throw new DomainError('conflict', `This comparison has already ${before.status === 'done' ? 'finished' : before.status}; there is nothing to cancel.`);
  }
  return findCompareRun(db, workspaceId, runId, now);
}

/* -------------------------------------------------------------------------------------------- */
/* Execute                                                                                        */
/* -------------------------------------------------------------------------------------------- */

/** Everything the thread needs, read from the database (tables parsed, fits' draws as stored). */
export async function compareThreadInput(db: Exec, run: { workspaceId: string; spec: unknown; settings: unknown; seed: number }): Promise<CompareThreadInput> {
  const spec = run.spec as CompareSpec;
  const settings = run.settings as CompareSettings;
  const models: CompareThreadInput['models'] = [];
  for (const m of spec.models) {
    const ids = Object.values(m.tables);
    const rows = ids.length ? await db.select(datasetMetaColumns).from(datasets).where(and(eq(datasets.workspaceId, run.workspaceId), inArray(datasets.id, ids))) : [];
    const byId = new Map(rows.map((d) => [d.id, d]));
    const missing = Object.entries(m.tables).filter(([, id]) => !byId.has(id)).map(([name]) => name);
    if (missing.length) throw new Error(`The data of table ${missing.map((x) => `"${x}"`).join(', ')} was deleted before the comparison ran.`);
    const tables = await loadDataTables(db, Object.entries(m.tables).map(([name, id]) => ({ ...byId.get(id)!, name })));
    let fit: StoredFitRows | null = null;
    let fitNote: string | undefined;
    if (m.fitRunId) {
      const chains = await db
        .select()
        .from(runChains)
        .where(and(eq(runChains.workspaceId, run.workspaceId), eq(runChains.runId, m.fitRunId)))
        .orderBy(runChains.chainIndex);
      if (chains.length) {
        const st = chains[0].stats as ChainStats;
        fit = {
          runId: m.fitRunId,
          unknownNames: st.unknownNames,
          derivedNames: st.derivedNames,
          chains: chains.map((c) => ({ chainIndex: c.chainIndex, drawCount: c.drawCount, dimension: c.dimension, draws: new Uint8Array(c.draws.buffer, c.draws.byteOffset, c.draws.byteLength) })),
        };
      } else fitNote = 'The matching fit has no stored draws; fit this model again to see leave-one-out.';
    } else fitNote = 'No finished fit of this model as it is now (same program and tables): fit this model to see leave-one-out.';
    models.push({ cellId: m.cellId, label: m.label, source: m.source, tables, tableIds: m.tables, fit, ...(fitNote ? { fitNote } : {}) });
  }
  return {
    models,
    hypotheses: settings.hypotheses,
    reference: settings.reference,
    priorOdds: settings.priorOdds,
    replicates: settings.replicates,
    seed: run.seed,
    factors: settings.factors,
  };
}

/**
 * Run the computation on a thread of its own. Aborting the signal terminates the thread (the
 * annealing loops are synchronous, so this is how a cancel lands at once).
 */
export function computeOnThread(input: CompareThreadInput, signal?: AbortSignal, onProgress?: (p: CompareProgress) => void): Promise<CompareResult> {
  return new Promise<CompareResult>((resolve, reject) => {
    if (signal?.aborted) {
      const e = new Error('The comparison was cancelled.');
      e.name = 'AbortError';
      reject(e);
      return;
    }
    const w = new Worker(THREAD_BOOT, { workerData: { slacklineCompare: true } });
    let settled = false;
    const end = (f: () => void) => {
      if (settled) return;
      settled = true;
      signal?.removeEventListener('abort', onAbort);
      void w.terminate();
      f();
    };
    const onAbort = () =>
      end(() => {
        const e = new Error('The comparison was cancelled.');
        e.name = 'AbortError';
        reject(e);
      });
    signal?.addEventListener('abort', onAbort);
    w.on('message', (m: CompareThreadMessage) => {
      if (m.type === 'progress') onProgress?.(m.progress);
      else if (m.type === 'done') end(() => resolve(m.result));
      else end(() => reject(new Error(m.message)));
    });
    w.on('error', (e) => end(() => reject(e)));
    w.on('exit', (code) => end(() => reject(new Error(`The comparison thread stopped (exit code ${code}).`))));
    w.postMessage(input);
  });
}

const fenced = (runId: string, workerId: string) => and(eq(runs.id, runId), eq(runs.leaseOwner, workerId), eq(runs.status, 'running'));

/** Store the result as the run's summary and mark it done, fenced on the lease. */
export async function finishCompare(db: Db, run: Pick<RunRow, 'id' | 'workspaceId'>, workerId: string, result: CompareResult, now: Date, timings: Record<string, number>): Promise<boolean> {
  const summary = compareResultSchema.parse(result);
  return db.transaction(async (tx) => {
    const [mine] = await tx.select({ id: runs.id }).from(runs).where(fenced(run.id, workerId)).for('update');
    if (!mine) return false;
    await tx.delete(runSummaries).where(eq(runSummaries.runId, run.id));
    await tx.insert(runSummaries).values({ runId: run.id, workspaceId: run.workspaceId, summary: summary as unknown as FitSummary, createdAt: now });
    await tx
      .update(runs)
      .set({ status: 'done', finishedAt: now, leaseOwner: null, leaseExpiresAt: null, heartbeatAt: null, progress: null, timings, error: null, partial: false })
      .where(eq(runs.id, run.id));
    return true;
  });
}

/**
 * The worker runs a claimed comparison as one unit of work (jobs.ts): read its models, compute on a
 * thread of its own, report each step as the unit's progress; the worker stores the result as the
 * run's summary under the unit's lease.
 */
registerWholeRunJob('compare', async (ctx) => {
  const input = await compareThreadInput(ctx.db, ctx.run);
  // The unit's progress column holds fit progress records; a comparison's progress rides in it as it is.
  const result = await computeOnThread(input, ctx.signal, (p) => ctx.progress(p as unknown as FitProgress[]));
  ctx.log(`comparison ${ctx.run.id} computed`);
  return { summary: compareResultSchema.parse(result) as unknown as FitSummary };
});
