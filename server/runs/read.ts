/** Reading runs: rows to API objects, draws for plots and CSV, the region of a run's model. */
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { fitSummarySchema, type FitSummary } from '../../shared/fit';
import { RUN_HEARTBEAT, type Run, type RunDraws } from '../../shared/api/notebook';
import { runChains, runs, runSummaries, users, datasets } from '../db/schema';
import type { Exec } from '../lib/audit';
import { DomainError } from '../lib/errors';
import { queuePositions, type RunRow } from './queue';
import { computeFailure, datasetMetaColumns, loadDataTables } from '../notebook/datasets';
import { checkModelOffThread } from '../notebook/checks';
import { computePool } from '../compute/pool';
import { cachedRegionProjections } from '../notebook/projections';
import type { StoredChainInput } from '../compute/tasks';
import { isCompareSpec } from './compare-job';

/** Is the worker holding this running run silent (lease expired or heartbeat stale)? */
export function workerLost(r: Pick<RunRow, 'status' | 'leaseExpiresAt' | 'heartbeatAt'>, now: Date): boolean {
  if (r.status !== 'running') return false;
  if (!r.leaseExpiresAt || r.leaseExpiresAt.getTime() < now.getTime()) return true;
  return r.heartbeatAt !== null && now.getTime() - r.heartbeatAt.getTime() > RUN_HEARTBEAT.staleMs;
}

/** Live facts of a run the row alone does not give: the time now and the queue's order. */
export interface RunView {
  now: Date;
  positions?: Map<string, number>;
}

export function toRun(r: RunRow, summary: FitSummary | null, requestedByName: string | null, view: RunView = { now: new Date() }): Run {
  return {
    id: r.id,
    cellId: r.cellId ?? null,
    notebookId: r.notebookId,
    status: r.status,
    settings: fitSummarySchema.shape.settings.parse(r.settings),
    modelHash: r.modelHash,
    createdBy: r.requestedBy && requestedByName !== null ? { id: r.requestedBy, name: requestedByName } : null,
    createdAt: r.createdAt.toISOString(),
    startedAt: r.startedAt?.toISOString() ?? null,
    finishedAt: r.finishedAt?.toISOString() ?? null,
    error: r.error ?? null,
    progress: Array.isArray(r.progress) ? r.progress : [],
    summary,
    worker: r.status === 'running' ? (workerLost(r, view.now) ? 'lost' : 'active') : null,
    lastHeartbeatAt: r.status === 'running' ? (r.heartbeatAt?.toISOString() ?? null) : null,
    queuePosition: r.status === 'queued' ? (view.positions?.get(r.id) ?? null) : null,
    partial: r.partial,
  };
}

async function withSummaries(exec: Exec, rows: { r: RunRow; name: string | null }[], now: Date): Promise<Run[]> {
  const ids = rows.filter((x) => x.r.status === 'done').map((x) => x.r.id);
  const sums = ids.length ? await exec.select().from(runSummaries).where(inArray(runSummaries.runId, ids)) : [];
  const byId = new Map(sums.map((s) => [s.runId, s.summary]));
  // The queue's order is read only when a queued run is shown.
  const positions = rows.some((x) => x.r.status === 'queued') ? await queuePositions(exec, now) : undefined;
  return rows.map((x) => toRun(x.r, byId.get(x.r.id) ?? null, x.name, { now, positions }));
}

export async function findRun(exec: Exec, workspaceId: string, runId: string, now = new Date()): Promise<Run & { row: RunRow }> {
  const [x] = await exec
    .select({ r: runs, name: users.name })
    .from(runs)
    .leftJoin(users, eq(users.id, runs.requestedBy))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, runId)))
    .limit(1);
  // Compare jobs share the table but not the shape (compare-job.ts reads them).
  if (!x || isCompareSpec(x.r.spec)) throw new DomainError('not_found', 'Run not found');
  const [run] = await withSummaries(exec, [x], now);
  return { ...run, row: x.r };
}

export async function cellRuns(exec: Exec, workspaceId: string, notebookId: string, cellId: string, now = new Date(), limit = 50): Promise<Run[]> {
  const rows = await exec
    .select({ r: runs, name: users.name })
    .from(runs)
    .leftJoin(users, eq(users.id, runs.requestedBy))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.notebookId, notebookId), eq(runs.cellId, cellId)))
    .orderBy(desc(runs.createdAt), desc(runs.id))
    .limit(limit);
  return withSummaries(exec, rows.filter((x) => !isCompareSpec(x.r.spec)), now);
}

/** Stored chains as the compute tasks take them (raw bytes; decoding happens on the thread). */
async function storedChainInputs(exec: Exec, workspaceId: string, runId: string): Promise<{ names: string[]; unknownNames: string[]; chains: StoredChainInput[] }> {
  const rows = await exec
    .select()
    .from(runChains)
    .where(and(eq(runChains.workspaceId, workspaceId), eq(runChains.runId, runId)))
    .orderBy(asc(runChains.chainIndex));
  if (rows.length === 0) throw new DomainError('not_found', 'This run has no stored draws');
  const stats = rows[0].stats;
  if (!stats) throw new Error(`Run ${runId}: a chain was stored without its statistics`);
  return {
    names: [...stats.unknownNames, ...stats.derivedNames],
    unknownNames: stats.unknownNames,
    chains: rows.map((r) => ({
      chain: r.chainIndex + 1,
      draws: new Uint8Array(r.draws.buffer, r.draws.byteOffset, r.draws.byteLength),
      drawCount: r.drawCount,
      dimension: r.dimension,
      divergent: r.stats?.divergent ?? [],
    })),
  };
}

/** Draws per chain and quantity, thinned to at most `max` per chain, with the model's region. */
export async function runDraws(exec: Exec, run: RunRow, max: number): Promise<RunDraws> {
  const loaded = await storedChainInputs(exec, run.workspaceId, run.id);
  const [thinned, region] = await Promise.all([
    computePool()
      .run('thinDraws', { chains: loaded.chains, quantities: loaded.names.length, max })
      .catch((e: unknown) => {
        throw computeFailure(e, 'Reading the draws');
      }),
    runRegion(exec, run, loaded.unknownNames),
  ]);
  const projections = region
    ? await cachedRegionProjections(run.id, () =>
        computePool()
          .run('projections', { region, chains: loaded.chains })
          .catch((e: unknown) => {
            throw computeFailure(e, 'Drawing the region');
          }),
      )
    : [];
  return { names: loaded.names, unknownCount: loaded.unknownNames.length, thin: thinned.thin, chains: thinned.chains, region, projections };
}

/** The draws export (header and every draw of every chain) as UTF-8 CSV, built on a compute thread. */
export async function runDrawsCsv(exec: Exec, workspaceId: string, runId: string): Promise<Uint8Array> {
  const loaded = await storedChainInputs(exec, workspaceId, runId);
  return computePool()
    .run('drawsCsv', { names: loaded.names, chains: loaded.chains })
    .catch((e: unknown) => {
      throw computeFailure(e, 'Writing the draws file');
    });
}

/** The constraint rows of the model a run fitted (data filled in), or null when unavailable. */
export async function runRegion(exec: Exec, run: RunRow, names: string[]) {
  const spec = run.spec;
  if (!spec) return null;
  try {
    const ids = Object.values(spec.tables);
    const rows = ids.length ? await exec.select(datasetMetaColumns).from(datasets).where(and(eq(datasets.workspaceId, run.workspaceId), inArray(datasets.id, ids))) : [];
    const byId = new Map(rows.map((d) => [d.id, d]));
    if (ids.some((id) => !byId.has(id))) return null;
    const tables = await loadDataTables(exec, Object.entries(spec.tables).map(([name, id]) => ({ ...byId.get(id)!, name })));
    return (await checkModelOffThread(spec.source, tables, false, names)).regionSystem;
  } catch {
    return null;
  }
}
