/**
 * Runs as jobs in MariaDB (no other queue): a run row is the job.
 *
 *   queued ──claim──▶ running ──finish──▶ done
 *                        │  └──fail────▶ failed
 *                        │  └──cancel (API sets it; the heartbeat notices and the worker stops)
 *                        └─ lease expired ─▶ claimable again (attempts + 1; failed after maxAttempts)
 *
 * A worker claims with SELECT … FOR UPDATE SKIP LOCKED so concurrent workers never take the same
 * row, holds a lease it extends with a heartbeat, writes per-chain progress, stores each chain as it
 * finishes, and marks the run done in one transaction together with its summary. Every write after
 * the claim is fenced on (lease_owner = me AND status = 'running'), so a worker that lost its lease
 * changes nothing. Stored chains outlive a lost lease: the next worker to claim the run resumes
 * from them and runs only the missing chains. A run that ends failed or cancelled drops them.
 */
import { and, asc, eq, inArray, lt, or, sql } from 'drizzle-orm';
import { RUN_LIMITS } from '../../shared/api/notebook';
import type { ChainStats, FitProgress, FitSummary } from '../../shared/fit';
import type { Db } from '../db/client';
import { runChains, runs, runSummaries } from '../db/schema';
import { newId } from '../lib/ids';
import type { ChainResult } from '../engine/types';
import { decodeDraws, decodeFlags, decodeFloats, encodeChain, type DrawNames, type EncodedChain } from './draws-codec';
import { ACTIVE_RUN_STATUSES } from '../../shared/terms';

export type RunRow = typeof runs.$inferSelect;


export type { DrawNames, EncodedChain } from './draws-codec';
export type { ChainStats, RunSpec } from '../../shared/fit';

const fenced = (runId: string, workerId: string) => and(eq(runs.id, runId), eq(runs.leaseOwner, workerId), eq(runs.status, 'running'));

/** Queued, or running with a lease that expired before `now`. */
const claimableSql = (now: Date) => sql`(r.status = 'queued' OR (r.status = 'running' AND r.lease_expires_at < ${now}))`;

/**
 * Claimable runs in the order fit slots take them, fair between workspaces: a run's turn is its
 * rank among its workspace's claimable runs (oldest first) plus the runs the workspace already has
 * running, so each workspace's first waiting run comes before any workspace's second (round-robin
 * by workspace), and ties go to the older run.
 */
export async function claimOrder(db: Pick<Db, 'execute'>, now: Date, limit: number | null): Promise<{ id: string; workspaceId: string }[]> {
  const [rows] = (await db.execute(sql`
    SELECT q.id, q.workspace_id AS workspaceId FROM (
      SELECT r.id, r.workspace_id, r.created_at,
        ROW_NUMBER() OVER (PARTITION BY r.workspace_id ORDER BY r.created_at, r.id)
          + (SELECT COUNT(*) FROM runs x WHERE x.workspace_id = r.workspace_id AND x.status = 'running' AND x.lease_expires_at >= ${now}) AS turn
      FROM runs r WHERE ${claimableSql(now)}
    ) q ORDER BY q.turn, q.created_at, q.id ${limit === null ? sql`` : sql`LIMIT ${limit}`}`)) as unknown as [{ id: string; workspaceId: string }[]];
  return rows;
}

/** 1-based place of each queued run of a workspace in the claim order (see claimOrder). */
export async function queuePositions(db: Pick<Db, 'execute'>, now: Date): Promise<Map<string, number>> {
  const order = await claimOrder(db, now, null);
  return new Map(order.map((r, i) => [r.id, i + 1]));
}

/**
 * Claim the claimable run whose turn comes first (claimOrder): queued, or running with an expired
 * lease. A run whose lease expired `maxAttempts` times is marked failed instead. Returns null when
 * nothing is claimable (or every candidate is being claimed by another worker at this moment).
 */
export async function claimRun(db: Db, workerId: string, now: Date, leaseMs: number): Promise<RunRow | null> {
  const claimable = or(eq(runs.status, 'queued'), and(eq(runs.status, 'running'), lt(runs.leaseExpiresAt, now)));
  // Candidates are read without locks: InnoDB locks every row a locking read scans (a sort
  // reads them all), so one claim would hide every queued row from the others. Each candidate is
  // then locked by primary key with SKIP LOCKED and checked again under the lock.
  for (;;) {
    const candidates = await claimOrder(db, now, 16);
    if (candidates.length === 0) return null;
    let retry = false;
    for (const { id } of candidates) {
      const outcome = await db.transaction(async (tx) => {
        const [row] = await tx
          .select()
          .from(runs)
          .where(and(eq(runs.id, id), claimable))
          .for('update', { skipLocked: true });
        if (!row) return null;
        if (row.status === 'running' && row.attempts >= RUN_LIMITS.maxAttempts) {
          await tx
            .update(runs)
            .set({ status: 'failed', leaseOwner: null, leaseExpiresAt: null, finishedAt: now, error: `The worker running this fit stopped answering ${row.attempts} times; the fit was given up.` })
            .where(eq(runs.id, row.id));
          await tx.delete(runChains).where(eq(runChains.runId, row.id));
          return 'gave-up' as const;
        }
        const claimed = {
          status: 'running' as const, leaseOwner: workerId, leaseExpiresAt: new Date(now.getTime() + leaseMs), heartbeatAt: now,
          attempts: row.attempts + 1, startedAt: row.startedAt ?? now,
        };
        await tx.update(runs).set(claimed).where(eq(runs.id, row.id));
        return { ...row, ...claimed };
      });
      if (outcome === 'gave-up') {
        retry = true;
        continue;
      }
      if (outcome) return outcome;
    }
    // Every candidate was taken by someone else meanwhile (or given up): look again once more.
    if (!retry) return null;
  }
}

/** Extend the lease. false: the lease was lost or the run was cancelled — stop working on it. */
export async function heartbeat(db: Db, runId: string, workerId: string, now: Date, leaseMs: number): Promise<boolean> {
  const [res] = await db.update(runs).set({ leaseExpiresAt: new Date(now.getTime() + leaseMs), heartbeatAt: now }).where(fenced(runId, workerId));
  return res.affectedRows === 1;
}

export async function writeProgress(db: Db, runId: string, workerId: string, progress: FitProgress[]): Promise<boolean> {
  const [res] = await db.update(runs).set({ progress }).where(fenced(runId, workerId));
  return res.affectedRows === 1;
}

function chainRow(run: Pick<RunRow, 'id' | 'workspaceId'>, names: DrawNames, ch: ChainResult | EncodedChain, now: Date): typeof runChains.$inferInsert {
  const enc = 'stats' in ch ? ch : encodeChain(names, ch);
  return {
    id: newId(), workspaceId: run.workspaceId, runId: run.id, chainIndex: enc.chain, drawCount: enc.drawCount,
    dimension: enc.dimension, draws: enc.draws, stats: enc.stats, createdAt: now,
  };
}

/**
 * Store one finished chain while the run goes on (as the engine returned it, or already encoded
 * off the main thread). Fenced like every write: false (and nothing written) when this worker no
 * longer holds the run.
 */
export async function storeChain(db: Db, run: Pick<RunRow, 'id' | 'workspaceId'>, workerId: string, names: DrawNames, chain: ChainResult | EncodedChain, now: Date): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [mine] = await tx.select({ id: runs.id }).from(runs).where(fenced(run.id, workerId)).for('update');
    if (!mine) return false;
    await tx.delete(runChains).where(and(eq(runChains.runId, run.id), eq(runChains.chainIndex, chain.chain)));
    await tx.insert(runChains).values(chainRow(run, names, chain, now));
    return true;
  });
}

/**
 * The chains an earlier attempt of a run stored, as the engine returned them (to resume the fit).
 * A row without its per-draw statistics cannot be resumed exactly and is left out (it is run again).
 */
export async function storedChains(db: Pick<Db, 'select'>, run: Pick<RunRow, 'id' | 'workspaceId'>): Promise<ChainResult[]> {
  const rows = await db
    .select()
    .from(runChains)
    .where(and(eq(runChains.workspaceId, run.workspaceId), eq(runChains.runId, run.id)))
    .orderBy(asc(runChains.chainIndex));
  const out: ChainResult[] = [];
  for (const r of rows) {
    const st = r.stats;
    if (!st || st.acceptStat === undefined) continue;
    const dimU = st.unknownNames.length;
    const dimD = st.derivedNames.length;
    if (r.dimension !== dimU + dimD) continue;
    const all = decodeDraws(r.draws, r.drawCount, r.dimension);
    const draws = new Float64Array(r.drawCount * dimU);
    const derivedDraws = new Float64Array(r.drawCount * dimD);
    for (let t = 0; t < r.drawCount; t++) {
      draws.set(all.subarray(t * r.dimension, t * r.dimension + dimU), t * dimU);
      derivedDraws.set(all.subarray(t * r.dimension + dimU, (t + 1) * r.dimension), t * dimD);
    }
    out.push({
      chain: r.chainIndex,
      draws,
      derivedDraws,
      divergent: decodeFlags(st.divergent, r.drawCount),
      ...(st.rejected !== undefined ? { rejected: decodeFlags(st.rejected, r.drawCount) } : {}),
      acceptStat: decodeFloats(st.acceptStat),
      ...(st.energy !== undefined ? { energy: decodeFloats(st.energy) } : {}),
      stepSize: st.stepSize ?? NaN,
      ...(st.factorizationsPerStep !== undefined ? { factorizationsPerStep: st.factorizationsPerStep } : {}),
    });
  }
  return out;
}

/**
 * Store the summary and mark the run done, in one transaction. The chains were stored as they
 * finished (storeChain); any the run lacks (a chain write that failed) are stored here, so the
 * run never ends with missing or duplicated chains.
 */
export async function finishRun(
  db: Db,
  run: Pick<RunRow, 'id' | 'workspaceId'>,
  workerId: string,
  result: DrawNames & { chains: ChainResult[]; summary: FitSummary },
  now: Date,
  timings: Record<string, number>,
  opts: { partial?: boolean } = {},
): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [mine] = await tx.select({ id: runs.id }).from(runs).where(fenced(run.id, workerId)).for('update');
    if (!mine) return false;
    const have = new Set(
      (await tx.select({ chainIndex: runChains.chainIndex }).from(runChains).where(and(eq(runChains.workspaceId, run.workspaceId), eq(runChains.runId, run.id)))).map((r) => r.chainIndex),
    );
    for (const ch of result.chains) {
      if (!have.has(ch.chain)) await tx.insert(runChains).values(chainRow(run, result, ch, now));
    }
    await tx.delete(runSummaries).where(eq(runSummaries.runId, run.id));
    await tx.insert(runSummaries).values({ runId: run.id, workspaceId: run.workspaceId, summary: result.summary, createdAt: now });
    const s = result.summary.settings;
    const progress: FitProgress[] = result.chains.map((c) => ({ chain: c.chain + 1, phase: 'done', iteration: s.warmup + s.draws, total: s.warmup + s.draws, itersPerSecond: 0 }));
    await tx.update(runs).set({ status: 'done', finishedAt: now, leaseOwner: null, leaseExpiresAt: null, heartbeatAt: null, progress, timings, error: null, partial: opts.partial ?? false }).where(eq(runs.id, run.id));
    return true;
  });
}

/** Mark the run failed and drop the chains it stored (a failed run shows no draws). */
export async function failRun(db: Db, runId: string, workerId: string, message: string, now: Date): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [res] = await tx
      .update(runs)
      .set({ status: 'failed', error: message.slice(0, 4000), finishedAt: now, leaseOwner: null, leaseExpiresAt: null, heartbeatAt: null })
      .where(fenced(runId, workerId));
    if (res.affectedRows !== 1) return false;
    await tx.delete(runChains).where(eq(runChains.runId, runId));
    return true;
  });
}

/** Cancel from the API: a queued run stops at once; a running one when its worker next beats. */
export async function cancelRun(db: Db, workspaceId: string, runId: string, now: Date): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [res] = await tx
      .update(runs)
      .set({ status: 'cancelled', finishedAt: now, leaseOwner: null, leaseExpiresAt: null })
      .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, runId), inArray(runs.status, [...ACTIVE_RUN_STATUSES])));
    if (res.affectedRows !== 1) return false;
    // Chains a worker stored before the cancel (its later writes are fenced out).
    await tx.delete(runChains).where(and(eq(runChains.workspaceId, workspaceId), eq(runChains.runId, runId)));
    return true;
  });
}

/**
 * Runs queued or running in a workspace (for the per-workspace limit): fits, or with
 * `kind: 'compare'` the comparisons (server/runs/compare-job.ts), each kind with a limit of its own.
 */
export async function activeRunCount(db: Pick<Db, 'select'>, workspaceId: string, kind: 'fit' | 'compare' = 'fit'): Promise<number> {
  const isCompare = sql`COALESCE(JSON_VALUE(${runs.spec}, '$.kind'), '') = 'compare'`;
  const [row] = await db
    .select({ n: sql<number>`count(*)` })
    .from(runs)
    .where(and(eq(runs.workspaceId, workspaceId), inArray(runs.status, [...ACTIVE_RUN_STATUSES]), kind === 'compare' ? isCompare : sql`NOT ${isCompare}`));
  return Number(row?.n ?? 0);
}
