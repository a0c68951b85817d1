/** Reading runs: rows to API objects, draws for plots and CSV, the region of a run's model. */
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { fitSummarySchema, type FitProgress, type FitSummary } from '../../shared/fit';
import { RUN_HEARTBEAT, type Run, type RunDraws } from '../../shared/api/notebook';
import { runChains, runs, runSummaries, users, datasets } from '../db/schema';
import type { Exec } from '../lib/audit';
import { notFound } from '../http/errors';
import { decodeDraws, decodeFlags } from '../jobs/draws-codec';
import { queuePositions, type ChainStats, type RunRow, type RunSpec } from '../jobs/queue';
import { toDataTables } from './datasets';
import { checkModel, regionSystem } from './model';

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
    progress: Array.isArray(r.progress) ? (r.progress as FitProgress[]) : [],
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
  const byId = new Map(sums.map((s) => [s.runId, s.summary as FitSummary]));
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
  if (!x) throw notFound('Run not found');
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
  return withSummaries(exec, rows, now);
}

export interface LoadedChains {
  unknownNames: string[];
  derivedNames: string[];
  chains: { chain: number; draws: Float64Array; drawCount: number; dimension: number; divergent: Uint8Array; rejected: Uint8Array }[];
}

export async function loadChains(exec: Exec, workspaceId: string, runId: string): Promise<LoadedChains> {
  const rows = await exec
    .select()
    .from(runChains)
    .where(and(eq(runChains.workspaceId, workspaceId), eq(runChains.runId, runId)))
    .orderBy(asc(runChains.chainIndex));
  if (rows.length === 0) throw notFound('This run has no stored draws');
  const stats = rows[0].stats as ChainStats;
  return {
    unknownNames: stats.unknownNames,
    derivedNames: stats.derivedNames,
    chains: rows.map((r) => ({
      chain: r.chainIndex + 1,
      draws: decodeDraws(r.draws, r.drawCount, r.dimension),
      drawCount: r.drawCount,
      dimension: r.dimension,
      divergent: decodeFlags((r.stats as ChainStats).divergent, r.drawCount),
      // Rows stored before rejected steps were recorded have no list: read as none.
      rejected: decodeFlags((r.stats as ChainStats).rejected ?? [], r.drawCount),
    })),
  };
}

/** Draws per chain and quantity, thinned to at most `max` per chain, with the model's region. */
export async function runDraws(exec: Exec, run: RunRow, max: number): Promise<RunDraws> {
  const loaded = await loadChains(exec, run.workspaceId, run.id);
  const names = [...loaded.unknownNames, ...loaded.derivedNames];
  const n = loaded.chains[0]?.drawCount ?? 0;
  // A regular stride, so "every thin-th draw" is exact and iterations can be labelled.
  const thin = Math.max(1, Math.ceil(n / Math.max(1, max)));
  const idx: number[] = [];
  for (let t = 0; t < n; t += thin) idx.push(t);
  const chains = loaded.chains.map((c) => ({
    chain: c.chain,
    values: names.map((_, q) => idx.map((t) => c.draws[t * c.dimension + q])),
    divergent: idx.map((t) => c.divergent[t]),
  }));
  return { names, unknownCount: loaded.unknownNames.length, thin, chains, region: await runRegion(exec, run, loaded.unknownNames) };
}

/** The constraint rows of the model a run fitted (data filled in), or null when unavailable. */
export async function runRegion(exec: Exec, run: RunRow, names: string[]) {
  const spec = run.spec as RunSpec | null;
  if (!spec) return null;
  try {
    const ids = Object.values(spec.tables);
    const rows = ids.length ? await exec.select().from(datasets).where(and(eq(datasets.workspaceId, run.workspaceId), inArray(datasets.id, ids))) : [];
    const byId = new Map(rows.map((d) => [d.id, d]));
    if (ids.some((id) => !byId.has(id))) return null;
    const tables = toDataTables(Object.entries(spec.tables).map(([name, id]) => ({ ...byId.get(id)!, name })));
    const m = checkModel(spec.source, tables, false);
    if (!m.rows || m.rows.inequalities.cols !== names.length) return null;
    return regionSystem(names, m.rows);
  } catch {
    return null;
  }
}
