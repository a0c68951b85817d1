/** Reading runs: rows to API objects, draws for plots and CSV, the region of a run's model. */
import { and, asc, desc, eq, inArray } from 'drizzle-orm';
import { type ChainStats, type FitProgress, fitSummarySchema, type FitSummary } from '../../shared/fit';
import { RUN_HEARTBEAT, type Run, type RunDraws } from '../../shared/api/notebook';
import { runChains, runs, runSummaries, users, datasets } from '../db/schema';
import type { Exec } from '../lib/audit';
import { DomainError } from '../lib/errors';
import { unitsOf, type UnitRow } from './units';
import { queuePositions, type RunRow } from './queue';
import { computeFailure, datasetMetaColumns, loadDataTables } from '../notebook/datasets';
import { checkModelOffThread } from '../notebook/checks';
import { computePool } from '../compute/pool';
import { cachedRegionProjections } from '../notebook/projections';
import type { StoredChainInput } from '../compute/tasks';
import { encodeDrawsHead } from '../../shared/draws-binary';
import { isCompareSpec } from './compare-job';

/** Is the worker holding this running run silent (lease expired or heartbeat stale)? */
export function workerLost(r: { status: string; leaseExpiresAt: Date | null; heartbeatAt: Date | null }, now: Date): boolean {
  if (r.status !== 'running') return false;
  if (!r.leaseExpiresAt || r.leaseExpiresAt.getTime() < now.getTime()) return true;
  return r.heartbeatAt !== null && now.getTime() - r.heartbeatAt.getTime() > RUN_HEARTBEAT.staleMs;
}

/** Live facts of a run the row alone does not give: the time now and the queue's order. */
export interface RunView {
  now: Date;
  positions?: Map<string, number>;
  /** The units of running runs (their per-chain progress and liveness). */
  units?: Map<string, UnitRow[]>;
}

/** A running run's progress and liveness from its units: each chain's own progress and lease. */
function liveFromUnits(r: RunRow, units: UnitRow[], now: Date): { progress: FitProgress[]; worker: 'active' | 'lost'; lastHeartbeatAt: string | null } {
  const total = (() => {
    const s = r.settings as { warmup?: number; draws?: number } | null;
    return (s?.warmup ?? 0) + (s?.draws ?? 0);
  })();
  const progress: FitProgress[] = [];
  let lost = false;
  let last: Date | null = null;
  for (const u of units) {
    if (u.status === 'running') {
      if (workerLost(u, now)) lost = true;
      if (u.heartbeatAt && (!last || u.heartbeatAt > last)) last = u.heartbeatAt;
    }
    if (u.kind !== 'chain') continue;
    if (u.status === 'done') progress.push({ chain: u.unit + 1, phase: 'done', iteration: total, total, itersPerSecond: 0 });
    else if (u.status === 'running') {
      const p = Array.isArray(u.progress) ? (u.progress as FitProgress[])[0] : undefined;
      progress.push(p ?? { chain: u.unit + 1, phase: 'warmup', iteration: 0, total, itersPerSecond: 0 });
    }
  }
  return { progress, worker: lost ? 'lost' : 'active', lastHeartbeatAt: (last ?? r.heartbeatAt)?.toISOString() ?? null };
}

export function toRun(r: RunRow, summary: FitSummary | null, requestedByName: string | null, view: RunView = { now: new Date() }): Run {
  const units = r.status === 'running' ? view.units?.get(r.id) : undefined;
  const live = units && units.length ? liveFromUnits(r, units, view.now) : null;
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
    progress: live ? live.progress : Array.isArray(r.progress) ? r.progress : [],
    summary,
    worker: r.status === 'running' ? (live ? live.worker : workerLost(r, view.now) ? 'lost' : 'active') : null,
    lastHeartbeatAt: r.status === 'running' ? (live ? live.lastHeartbeatAt : (r.heartbeatAt?.toISOString() ?? null)) : null,
    queuePosition: r.status === 'queued' ? (view.positions?.get(r.id) ?? null) : null,
    partial: r.partial,
  };
}

export async function withSummaries(exec: Exec, rows: { r: RunRow; name: string | null }[], now: Date): Promise<Run[]> {
  const ids = rows.filter((x) => x.r.status === 'done').map((x) => x.r.id);
  const sums = ids.length ? await exec.select().from(runSummaries).where(inArray(runSummaries.runId, ids)) : [];
  const byId = new Map(sums.map((s) => [s.runId, s.summary]));
  // The queue's order is read only when a queued run is shown.
  const positions = rows.some((x) => x.r.status === 'queued') ? await queuePositions(exec, now) : undefined;
  const running = rows.filter((x) => x.r.status === 'running').map((x) => x.r.id);
  const units = new Map<string, UnitRow[]>();
  for (const u of await unitsOf(exec, running)) units.set(u.runId, [...(units.get(u.runId) ?? []), u]);
  return rows.map((x) => toRun(x.r, byId.get(x.r.id) ?? null, x.name, { now, positions, units }));
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

/** A cell's run rows (fits and comparisons alike) with their requesters' names, newest first. */
export function cellRunRows(exec: Exec, workspaceId: string, notebookId: string, cellId: string, limit: number) {
  return exec
    .select({ r: runs, name: users.name })
    .from(runs)
    .leftJoin(users, eq(users.id, runs.requestedBy))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.notebookId, notebookId), eq(runs.cellId, cellId)))
    .orderBy(desc(runs.createdAt), desc(runs.id))
    .limit(limit);
}

export async function cellRuns(exec: Exec, workspaceId: string, notebookId: string, cellId: string, now = new Date(), limit = 50): Promise<Run[]> {
  const rows = await cellRunRows(exec, workspaceId, notebookId, cellId, limit);
  return withSummaries(exec, rows.filter((x) => !isCompareSpec(x.r.spec)), now);
}

/**
 * The runs of several cells of one notebook (as cellRuns answers each, in the order of `cellIds`):
 * one read of their rows and one of their summaries, for the notebook screen's one request.
 */
export async function cellsRuns(exec: Exec, workspaceId: string, notebookId: string, cellIds: string[], now = new Date(), limit = 50): Promise<{ cellId: string; runs: Run[] }[]> {
  if (cellIds.length === 0) return [];
  const rows = await exec
    .select({ r: runs, name: users.name })
    .from(runs)
    .leftJoin(users, eq(users.id, runs.requestedBy))
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.notebookId, notebookId), inArray(runs.cellId, cellIds)))
    .orderBy(desc(runs.createdAt), desc(runs.id));
  const byCell = new Map<string, typeof rows>(cellIds.map((id) => [id, []]));
  for (const x of rows) {
    const list = x.r.cellId === null ? undefined : byCell.get(x.r.cellId);
    if (list && list.length < limit) list.push(x);
  }
  const kept = cellIds.flatMap((id) => byCell.get(id)!.filter((x) => !isCompareSpec(x.r.spec)));
  const all = await withSummaries(exec, kept, now);
  const out = new Map<string, Run[]>(cellIds.map((id) => [id, []]));
  for (const run of all) out.get(run.cellId ?? '')?.push(run);
  return cellIds.map((cellId) => ({ cellId, runs: out.get(cellId)! }));
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

/** A draws response in its binary form (shared/draws-binary.ts): the head, then the body. */
export interface DrawsBytes {
  head: Uint8Array;
  body: Uint8Array;
}

/**
 * Encoded draws responses by run, finish time and thinning: a finished run's draws never change,
 * so the thinning and encoding happen once per (run, max). Bounded by bytes, least recently used out.
 */
const DRAWS_CACHE = new Map<string, DrawsBytes>();
const DRAWS_CACHE_BYTES = 64 * 1024 * 1024;
let drawsCacheBytes = 0;
const sizeOf = (x: DrawsBytes) => x.head.byteLength + x.body.byteLength;

function cacheDraws(key: string, value: DrawsBytes): void {
  if (sizeOf(value) > DRAWS_CACHE_BYTES / 4) return;
  DRAWS_CACHE.set(key, value);
  drawsCacheBytes += sizeOf(value);
  while (drawsCacheBytes > DRAWS_CACHE_BYTES) {
    const [k, v] = DRAWS_CACHE.entries().next().value!;
    DRAWS_CACHE.delete(k);
    drawsCacheBytes -= sizeOf(v);
  }
}

/** How many draws responses were encoded (not served from the cache); tests read it. */
export const drawsEncodings = { count: 0 };

/**
 * Draws per chain and quantity, thinned to at most `max` per chain on the compute pool and encoded
 * there as Float32 columns, with the model's region in the JSON header.
 */
export async function runDraws(exec: Exec, run: RunRow, max: number): Promise<DrawsBytes> {
  const key = `${run.id}:${run.finishedAt?.getTime() ?? ''}:${max}`;
  const hit = DRAWS_CACHE.get(key);
  if (hit) {
    DRAWS_CACHE.delete(key);
    DRAWS_CACHE.set(key, hit);
    return hit;
  }
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
  const head = encodeDrawsHead({
    dtype: 'float32',
    names: loaded.names,
    unknownCount: loaded.unknownNames.length,
    thin: thinned.thin,
    drawsPerChain: thinned.drawsPerChain,
    chains: loaded.chains.map((c) => c.chain),
    region,
    projections,
  });
  drawsEncodings.count++;
  const out = { head, body: thinned.body };
  cacheDraws(key, out);
  return out;
}

/** Binary draws of one chain per CSV piece: about this many bytes of stored draws (≈ 3× as CSV). */
const CSV_CHUNK_BYTES = 256 * 1024;

/** Where the CSV export goes: the response (or any sink with the same few methods). */
export interface CsvSink {
  /** Called once, before the first bytes: the export can still fail with a clean error until then. */
  begin(): void;
  /** Write a piece; resolves when the sink can take more (backpressure). */
  write(bytes: Uint8Array): Promise<void>;
  end(): void;
}

/**
 * The draws export (header and every draw of every chain) as UTF-8 CSV, formatted on the compute
 * pool in bounded pieces (a few thousand rows each) and written to `sink` one after another, so the
 * main thread never holds the whole file. The next piece is formatted while the last is written.
 */
export async function streamRunDrawsCsv(exec: Exec, workspaceId: string, runId: string, sink: CsvSink, chunkBytes = CSV_CHUNK_BYTES): Promise<void> {
  const loaded = await storedChainInputs(exec, workspaceId, runId);
  const pieces: { c: StoredChainInput; t: number; count: number }[] = [];
  for (const c of loaded.chains) {
    const per = Math.max(1, Math.floor(chunkBytes / Math.max(1, c.dimension * 8)));
    for (let t = 0; t < c.drawCount; t += per) pieces.push({ c, t, count: Math.min(per, c.drawCount - t) });
  }
  // A run whose chains kept no draw still has its header.
  if (pieces.length === 0) pieces.push({ c: loaded.chains[0], t: 0, count: 0 });
  const format = (i: number) => {
    const { c, t, count } = pieces[i];
    const rowBytes = c.dimension * 8;
    return computePool()
      .run('drawsCsvChunk', {
        ...(i === 0 ? { names: loaded.names } : {}),
        chain: c.chain,
        firstIteration: t + 1,
        // A copy of just these rows: the thread gets (and is handed) no more than it formats.
        draws: c.draws.slice(t * rowBytes, (t + count) * rowBytes),
        drawCount: count,
        dimension: c.dimension,
      })
      .catch((e: unknown) => {
        throw computeFailure(e, 'Writing the draws file');
      });
  };
  let next = format(0);
  for (let i = 0; i < pieces.length; i++) {
    const piece = await next;
    if (i + 1 < pieces.length) {
      next = format(i + 1);
      next.catch(() => {}); // awaited on the next turn; a failed write must not leave it unhandled
    }
    if (i === 0) sink.begin();
    await sink.write(piece);
  }
  sink.end();
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
