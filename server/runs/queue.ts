/**
 * Runs as jobs in MariaDB (no other queue): a run row is the job, and its units (units.ts: one per
 * chain, then the summary; or one for a job that runs whole) are what slots claim.
 *
 *   queued ──first unit claimed──▶ running ──last unit (the summary) stored──▶ done
 *                                     │  └──a unit fails──▶ failed
 *                                     │  └──cancel (API sets it; heartbeats notice and slots stop)
 *                                     └─ a unit's lease expired ─▶ that unit is claimable again
 *
 * Chains are stored as they finish and outlive a lost lease: only the lost chain runs again. A run
 * that ends failed or cancelled drops them. This file holds the run-level reads and writes (queue
 * order and positions, stored chains, finish, fail, cancel); units.ts the claims and leases.
 */
import { and, asc, eq, inArray, sql } from 'drizzle-orm';
import type { ChainStats, FitProgress, FitSummary } from '../../shared/fit';
import type { Db } from '../db/client';
import { runChains, runs, runSummaries } from '../db/schema';
import { newId } from '../lib/ids';
import type { ChainResult } from '../engine/types';
import { endRun, unitClaimOrder } from './units';
import { decodeDraws, decodeFlags, decodeFloats, encodeChain, type DrawNames, type EncodedChain } from './draws-codec';
import { ACTIVE_RUN_STATUSES } from '../../shared/terms';

export type RunRow = typeof runs.$inferSelect;


export type { DrawNames, EncodedChain } from './draws-codec';
export type { ChainStats, RunSpec } from '../../shared/fit';

const fenced = (runId: string, workerId: string) => and(eq(runs.id, runId), eq(runs.leaseOwner, workerId), eq(runs.status, 'running'));

/**
 * Runs with claimable units in the order slots take them (the first unit of each run in
 * unitClaimOrder): fair between workspaces, oldest first within one.
 */
export async function claimOrder(db: Pick<Db, 'execute'>, now: Date, limit: number | null): Promise<{ id: string; workspaceId: string }[]> {
  const seen = new Set<string>();
  const out: { id: string; workspaceId: string }[] = [];
  for (const u of await unitClaimOrder(db, now, null)) {
    if (seen.has(u.runId)) continue;
    seen.add(u.runId);
    out.push({ id: u.runId, workspaceId: u.workspaceId });
    if (limit !== null && out.length >= limit) break;
  }
  return out;
}

/** 1-based place of each queued run of a workspace in the claim order (see claimOrder). */
export async function queuePositions(db: Pick<Db, 'execute'>, now: Date): Promise<Map<string, number>> {
  const order = await claimOrder(db, now, null);
  return new Map(order.map((r, i) => [r.id, i + 1]));
}

function chainRow(run: Pick<RunRow, 'id' | 'workspaceId'>, names: DrawNames, ch: ChainResult | EncodedChain, now: Date): typeof runChains.$inferInsert {
  const enc = 'stats' in ch ? ch : encodeChain(names, ch);
  return {
    id: newId(), workspaceId: run.workspaceId, runId: run.id, chainIndex: enc.chain, drawCount: enc.drawCount,
    dimension: enc.dimension, draws: enc.draws, stats: enc.stats, createdAt: now,
  };
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
    await endRun(tx, runId, now, 'failed', message);
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
    // Chains stored before the cancel go; units still waiting or running are dropped (their
    // slots' heartbeats and writes are fenced out).
    await endRun(tx, runId, now, 'cancelled', null);
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
