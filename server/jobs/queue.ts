/**
 * Runs as jobs in MariaDB (no other queue): a run row is the job.
 *
 *   queued ──claim──▶ running ──finish──▶ done
 *                        │  └──fail────▶ failed
 *                        │  └──cancel (API sets it; the heartbeat notices and the worker stops)
 *                        └─ lease expired ─▶ claimable again (attempts + 1; failed after maxAttempts)
 *
 * A worker claims with SELECT … FOR UPDATE SKIP LOCKED so concurrent workers never take the same
 * row, holds a lease it extends with a heartbeat, writes per-chain progress, and marks the run done
 * in one transaction together with its chains and summary. Every write after the claim is fenced
 * on (lease_owner = me AND status = 'running'), so a worker that lost its lease changes nothing.
 */
import { and, asc, eq, inArray, lt, or, sql } from 'drizzle-orm';
import { RUN_LIMITS } from '../../shared/api/notebook';
import type { FitProgress, FitSummary } from '../../shared/fit';
import type { Db } from '../db/client';
import { runChains, runs, runSummaries } from '../db/schema';
import { newId } from '../lib/ids';
import type { ChainResult } from '../engine/types';
import { encodeDraws, encodeFlags } from './draws-codec';

export type RunRow = typeof runs.$inferSelect;

/** What a run needs, frozen when it is queued. */
export interface RunSpec {
  source: string;
  /** Table name → dataset id. */
  tables: Record<string, string>;
}

/** Stored with every chain: names of the columns of its draws, and per-draw flags. */
export interface ChainStats {
  unknownNames: string[];
  derivedNames: string[];
  divergent: [number, number][];
  /** Draws whose transition was rejected (a step could not be completed); absent in older rows = none. */
  rejected?: [number, number][];
  stepSize: number | null;
  meanAcceptStat: number;
  factorizationsPerStep?: number;
}

const fenced = (runId: string, workerId: string) => and(eq(runs.id, runId), eq(runs.leaseOwner, workerId), eq(runs.status, 'running'));

/**
 * Claim the oldest claimable run: queued, or running with an expired lease. A run whose lease
 * expired `maxAttempts` times is marked failed instead. Returns null when nothing is claimable
 * (or every candidate is being claimed by another worker at this moment).
 */
export async function claimRun(db: Db, workerId: string, now: Date, leaseMs: number): Promise<RunRow | null> {
  const claimable = or(eq(runs.status, 'queued'), and(eq(runs.status, 'running'), lt(runs.leaseExpiresAt, now)));
  // Candidates are read without locks: InnoDB locks every row a locking read scans (a sort
  // reads them all), so one claim would hide every queued row from the others. Each candidate is
  // then locked by primary key with SKIP LOCKED and checked again under the lock.
  for (;;) {
    const candidates = await db.select({ id: runs.id }).from(runs).where(claimable).orderBy(asc(runs.createdAt), asc(runs.id)).limit(16);
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
          return 'gave-up' as const;
        }
        const claimed = { status: 'running' as const, leaseOwner: workerId, leaseExpiresAt: new Date(now.getTime() + leaseMs), attempts: row.attempts + 1, startedAt: row.startedAt ?? now };
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
  const [res] = await db.update(runs).set({ leaseExpiresAt: new Date(now.getTime() + leaseMs) }).where(fenced(runId, workerId));
  return res.affectedRows === 1;
}

export async function writeProgress(db: Db, runId: string, workerId: string, progress: FitProgress[]): Promise<boolean> {
  const [res] = await db.update(runs).set({ progress }).where(fenced(runId, workerId));
  return res.affectedRows === 1;
}

/** Store the chains and the summary and mark the run done, all in one transaction. */
export async function finishRun(
  db: Db,
  run: Pick<RunRow, 'id' | 'workspaceId'>,
  workerId: string,
  result: { unknownNames: string[]; derivedNames: string[]; chains: ChainResult[]; summary: FitSummary },
  now: Date,
  timings: Record<string, number>,
): Promise<boolean> {
  return db.transaction(async (tx) => {
    const [mine] = await tx.select({ id: runs.id }).from(runs).where(fenced(run.id, workerId)).for('update');
    if (!mine) return false;
    const dimU = result.unknownNames.length;
    const dimD = result.derivedNames.length;
    await tx.delete(runChains).where(and(eq(runChains.workspaceId, run.workspaceId), eq(runChains.runId, run.id)));
    for (const ch of result.chains) {
      const enc = encodeDraws(ch.draws, dimU, ch.derivedDraws, dimD);
      let accept = 0;
      for (let i = 0; i < ch.acceptStat.length; i++) accept += ch.acceptStat[i];
      const stats: ChainStats = {
        unknownNames: result.unknownNames,
        derivedNames: result.derivedNames,
        divergent: encodeFlags(ch.divergent),
        ...(ch.rejected ? { rejected: encodeFlags(ch.rejected) } : {}),
        stepSize: Number.isFinite(ch.stepSize) ? ch.stepSize : null,
        meanAcceptStat: ch.acceptStat.length ? accept / ch.acceptStat.length : NaN,
        ...(ch.factorizationsPerStep !== undefined ? { factorizationsPerStep: ch.factorizationsPerStep } : {}),
      };
      await tx.insert(runChains).values({
        id: newId(), workspaceId: run.workspaceId, runId: run.id, chainIndex: ch.chain, drawCount: enc.drawCount,
        dimension: enc.dimension, draws: enc.buffer, stats, createdAt: now,
      });
    }
    await tx.delete(runSummaries).where(eq(runSummaries.runId, run.id));
    await tx.insert(runSummaries).values({ runId: run.id, workspaceId: run.workspaceId, summary: result.summary, createdAt: now });
    const s = result.summary.settings;
    const progress: FitProgress[] = result.chains.map((c) => ({ chain: c.chain + 1, phase: 'done', iteration: s.warmup + s.draws, total: s.warmup + s.draws, itersPerSecond: 0 }));
    await tx.update(runs).set({ status: 'done', finishedAt: now, leaseOwner: null, leaseExpiresAt: null, progress, timings, error: null }).where(eq(runs.id, run.id));
    return true;
  });
}

export async function failRun(db: Db, runId: string, workerId: string, message: string, now: Date): Promise<boolean> {
  const [res] = await db
    .update(runs)
    .set({ status: 'failed', error: message.slice(0, 4000), finishedAt: now, leaseOwner: null, leaseExpiresAt: null })
    .where(fenced(runId, workerId));
  return res.affectedRows === 1;
}

/** Cancel from the API: a queued run stops at once; a running one when its worker next beats. */
export async function cancelRun(db: Db, workspaceId: string, runId: string, now: Date): Promise<boolean> {
  const [res] = await db
    .update(runs)
    .set({ status: 'cancelled', finishedAt: now, leaseOwner: null, leaseExpiresAt: null })
    .where(and(eq(runs.workspaceId, workspaceId), eq(runs.id, runId), inArray(runs.status, ['queued', 'running'])));
  return res.affectedRows === 1;
}

/** Runs queued or running in a workspace (for the per-workspace limit). */
export async function activeRunCount(db: Pick<Db, 'select'>, workspaceId: string): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)` })
    .from(runs)
    .where(and(eq(runs.workspaceId, workspaceId), inArray(runs.status, ['queued', 'running'])));
  return Number(row?.n ?? 0);
}
