/**
 * The claimable units of runs: a fit's chains one by one, then its summary; or one unit for work
 * that runs whole (a run whose spec has a `kind` other than a fit, e.g. 'compare').
 *
 *   run queued ──(units made at queue time)──▶ chain 0 … chain n−1  (status queued)
 *   a slot claims a unit ──▶ running (lease + heartbeat of its own) ──▶ done (chain stored)
 *                                         │                          └▶ dropped (past the time limit)
 *                                         └─ lease expired ─▶ claimable again (attempts + 1; the run
 *                                            fails after maxAttempts)
 *   the slot that ends the last chain unit also creates the 'finish' unit, already claimed by
 *   itself, and summarises; if it dies, the finish unit's lease expires and another slot takes it.
 *
 * Claims are fair: a unit's turn is its rank among its workspace's claimable units (oldest run
 * first, then chain order) plus the units the workspace has running now; equal turns go first to
 * the workspace served least recently (so a workspace that just had a slot yields to one that
 * waits), then to the older run. A big fit queued first therefore holds at most the slots it has
 * already, and a 1-chain fit queued later in another workspace takes the next free slot.
 *
 * Lock order everywhere: the run row, then unit rows. Every write after a claim is fenced on the
 * unit (lease_owner = me AND status = 'running') and on the run still running, so a slot that lost
 * its lease (or whose run was cancelled or failed) changes nothing.
 */
import { and, asc, eq, inArray, isNull, sql } from 'drizzle-orm';
import { RUN_LIMITS } from '../../shared/api/notebook';
import type { FitProgress, FitSummary } from '../../shared/fit';
import type { Db } from '../db/client';
import { runChains, runs, runSummaries, runUnits } from '../db/schema';
import type { ChainResult } from '../engine/types';
import type { Exec } from '../lib/audit';
import { newId } from '../lib/ids';
import { encodeChain, type DrawNames, type EncodedChain } from './draws-codec';
import type { RunRow } from './queue';

export type UnitRow = typeof runUnits.$inferSelect;
export interface Claim {
  run: RunRow;
  unit: UnitRow;
}

/** Is this run one unit of work (a job with a kind of its own) rather than a fit's chains? */
export function isWholeRunSpec(spec: unknown): boolean {
  const kind = (spec as { kind?: unknown } | null)?.kind;
  return typeof kind === 'string' && kind !== 'fit';
}

/** The unit rows of a newly queued run. */
export function unitsFor(run: Pick<RunRow, 'id' | 'workspaceId' | 'createdAt' | 'settings' | 'spec'>): (typeof runUnits.$inferInsert)[] {
  const base = { workspaceId: run.workspaceId, runId: run.id, status: 'queued' as const, attempts: 0, queuedAt: run.createdAt };
  if (isWholeRunSpec(run.spec)) return [{ ...base, id: newId(), unit: 0, kind: 'job' }];
  const chains = Math.max(1, Number((run.settings as { chains?: unknown } | null)?.chains) || 1);
  return Array.from({ length: chains }, (_, k) => ({ ...base, id: newId(), unit: k, kind: 'chain' as const }));
}

/** Units for queued runs that have none (rows written before units existed, or inserted directly). */
async function expandQueued(db: Db): Promise<void> {
  const bare = await db
    .select({ id: runs.id, workspaceId: runs.workspaceId, createdAt: runs.createdAt, settings: runs.settings, spec: runs.spec })
    .from(runs)
    .where(and(eq(runs.status, 'queued'), sql`NOT EXISTS (SELECT 1 FROM run_units u WHERE u.run_id = ${runs.id})`))
    .limit(100);
  for (const r of bare) {
    const rows = unitsFor(r);
    // Two slots may expand the same run at once: the unique (run_id, unit) keeps one set.
    await db.insert(runUnits).values(rows).onDuplicateKeyUpdate({ set: { runId: sql`run_id` } });
  }
}

const claimableUnitSql = (now: Date) =>
  sql`r.status IN ('queued', 'running') AND (u.status = 'queued' OR (u.status = 'running' AND u.lease_expires_at < ${now}))`;

/** Claimable units in the order slots take them (see the file's comment). */
export async function unitClaimOrder(
  db: Pick<Db, 'execute'>,
  now: Date,
  limit: number | null,
): Promise<{ id: string; runId: string; workspaceId: string; unit: number }[]> {
  const [rows] = (await db.execute(sql`
    SELECT q.id, q.run_id AS runId, q.workspace_id AS workspaceId, q.unit FROM (
      SELECT u.id, u.run_id, u.workspace_id, u.unit, u.queued_at,
        ROW_NUMBER() OVER (PARTITION BY u.workspace_id ORDER BY u.queued_at, u.run_id, u.unit)
          + (SELECT COUNT(*) FROM run_units x JOIN runs xr ON xr.id = x.run_id
             WHERE x.workspace_id = u.workspace_id AND x.status = 'running' AND x.lease_expires_at >= ${now} AND xr.status = 'running') AS turn,
        (SELECT MAX(y.claimed_at) FROM run_units y WHERE y.workspace_id = u.workspace_id) AS served
      FROM run_units u JOIN runs r ON r.id = u.run_id
      WHERE ${claimableUnitSql(now)}
    ) q ORDER BY q.turn, q.served IS NOT NULL, q.served, q.queued_at, q.run_id, q.unit ${limit === null ? sql`` : sql`LIMIT ${limit}`}`)) as unknown as [
    { id: string; runId: string; workspaceId: string; unit: number }[],
  ];
  return rows;
}

/**
 * Claim the unit whose turn comes first. A unit whose lease expired `maxAttempts` times fails its
 * run instead. Null when nothing is claimable (or every candidate was just taken by another slot).
 */
export async function claimUnit(db: Db, workerId: string, now: Date, leaseMs: number): Promise<Claim | null> {
  await expandQueued(db);
  for (;;) {
    const candidates = await unitClaimOrder(db, now, 16);
    if (candidates.length === 0) return null;
    let retry = false;
    for (const c of candidates) {
      const outcome = await db.transaction(async (tx) => {
        const [run] = await tx
          .select()
          .from(runs)
          .where(and(eq(runs.id, c.runId), inArray(runs.status, ['queued', 'running'])))
          .for('update');
        if (!run) return null;
        const [unit] = await tx
          .select()
          .from(runUnits)
          .where(and(eq(runUnits.id, c.id), sql`(${runUnits.status} = 'queued' OR (${runUnits.status} = 'running' AND ${runUnits.leaseExpiresAt} < ${now}))`))
          .for('update', { skipLocked: true });
        if (!unit) return null;
        if (unit.status === 'running' && unit.attempts >= RUN_LIMITS.maxAttempts) {
          const what = unit.kind === 'chain' ? `chain ${unit.unit + 1}` : unit.kind === 'finish' ? 'the summary' : 'this job';
          await endRun(tx, run.id, now, 'failed', `The worker running ${what} stopped answering ${unit.attempts} times; the fit was given up.`);
          return 'gave-up' as const;
        }
        const claimedUnit = {
          status: 'running' as const, leaseOwner: workerId, leaseExpiresAt: new Date(now.getTime() + leaseMs), heartbeatAt: now,
          attempts: unit.attempts + 1, claimedAt: now, progress: null,
        };
        await tx.update(runUnits).set(claimedUnit).where(eq(runUnits.id, unit.id));
        const lease = new Date(Math.max(run.leaseExpiresAt?.getTime() ?? 0, now.getTime() + leaseMs));
        const claimedRun = {
          status: 'running' as const, startedAt: run.startedAt ?? now, heartbeatAt: now, leaseExpiresAt: lease, leaseOwner: workerId,
          attempts: Math.max(run.attempts, unit.attempts + 1),
        };
        await tx.update(runs).set(claimedRun).where(eq(runs.id, run.id));
        return { run: { ...run, ...claimedRun }, unit: { ...unit, ...claimedUnit } };
      });
      if (outcome === 'gave-up') {
        retry = true;
        continue;
      }
      if (outcome) return outcome;
    }
    if (!retry) return null;
  }
}

const unitFence = (unitId: string, workerId: string) =>
  and(
    eq(runUnits.id, unitId),
    eq(runUnits.leaseOwner, workerId),
    eq(runUnits.status, 'running'),
    sql`EXISTS (SELECT 1 FROM runs r WHERE r.id = ${runUnits.runId} AND r.status = 'running')`,
  );

/** Extend a unit's lease. false: the lease was lost, or the run cancelled or failed — stop. */
export async function heartbeatUnit(db: Db, claim: Claim, workerId: string, now: Date, leaseMs: number): Promise<boolean> {
  const until = new Date(now.getTime() + leaseMs);
  const [res] = await db.update(runUnits).set({ leaseExpiresAt: until, heartbeatAt: now }).where(unitFence(claim.unit.id, workerId));
  if (res.affectedRows !== 1) return false;
  await db
    .update(runs)
    .set({ heartbeatAt: now, leaseExpiresAt: sql`GREATEST(COALESCE(${runs.leaseExpiresAt}, ${until}), ${until})` })
    .where(and(eq(runs.id, claim.run.id), eq(runs.status, 'running')));
  return true;
}

export async function writeUnitProgress(db: Db, claim: Claim, workerId: string, progress: FitProgress[]): Promise<boolean> {
  const [res] = await db.update(runUnits).set({ progress }).where(unitFence(claim.unit.id, workerId));
  return res.affectedRows === 1;
}

/** Locks the run (still running) and then the unit (still mine); false when either is gone. */
async function lockMine(tx: Exec, claim: Claim, workerId: string): Promise<boolean> {
  const [run] = await tx.select({ id: runs.id }).from(runs).where(and(eq(runs.id, claim.run.id), eq(runs.status, 'running'))).for('update');
  if (!run) return false;
  const [unit] = await tx
    .select({ id: runUnits.id })
    .from(runUnits)
    .where(and(eq(runUnits.id, claim.unit.id), eq(runUnits.leaseOwner, workerId), eq(runUnits.status, 'running')))
    .for('update');
  return !!unit;
}

/**
 * End a chain unit — its chain stored (done), or given up at the time limit (dropped) — and, when
 * it was the run's last chain, create the run's finish unit already claimed by this worker.
 */
export async function endChainUnit(
  db: Db,
  claim: Claim,
  workerId: string,
  outcome: { names: DrawNames; chain: ChainResult | EncodedChain } | 'dropped',
  now: Date,
  leaseMs: number,
): Promise<{ mine: boolean; finish: Claim | null }> {
  return db.transaction(async (tx) => {
    if (!(await lockMine(tx, claim, workerId))) return { mine: false, finish: null };
    if (outcome !== 'dropped') {
      const enc = 'stats' in outcome.chain ? outcome.chain : encodeChain(outcome.names, outcome.chain);
      await tx.delete(runChains).where(and(eq(runChains.runId, claim.run.id), eq(runChains.chainIndex, enc.chain)));
      await tx.insert(runChains).values({
        id: newId(), workspaceId: claim.run.workspaceId, runId: claim.run.id, chainIndex: enc.chain, drawCount: enc.drawCount,
        dimension: enc.dimension, draws: enc.draws, stats: enc.stats, createdAt: now,
      });
    }
    await tx
      .update(runUnits)
      .set({ status: outcome === 'dropped' ? 'dropped' : 'done', finishedAt: now, leaseOwner: null, leaseExpiresAt: null })
      .where(eq(runUnits.id, claim.unit.id));
    const [left] = await tx
      .select({ n: sql<number>`count(*)` })
      .from(runUnits)
      .where(and(eq(runUnits.runId, claim.run.id), eq(runUnits.kind, 'chain'), inArray(runUnits.status, ['queued', 'running'])));
    if (Number(left?.n ?? 0) > 0) return { mine: true, finish: null };
    const unit: UnitRow = {
      id: newId(), workspaceId: claim.run.workspaceId, runId: claim.run.id, unit: -1, kind: 'finish', status: 'running', leaseOwner: workerId,
      leaseExpiresAt: new Date(now.getTime() + leaseMs), heartbeatAt: now, attempts: 1, progress: null, queuedAt: claim.run.createdAt, claimedAt: now, finishedAt: null,
    };
    await tx.insert(runUnits).values(unit);
    return { mine: true, finish: { run: claim.run, unit } };
  });
}

/**
 * Store the run's summary and mark it done (and its finish or job unit), in one transaction.
 * `chainsDone` is how many chains the summary covers, for the progress shown afterwards.
 */
export async function finishUnitRun(
  db: Db,
  claim: Claim,
  workerId: string,
  out: { summary: FitSummary; chainsDone: number; total: number },
  now: Date,
  timings: Record<string, number>,
  partial: boolean,
): Promise<boolean> {
  return db.transaction(async (tx) => {
    if (!(await lockMine(tx, claim, workerId))) return false;
    await tx.delete(runSummaries).where(eq(runSummaries.runId, claim.run.id));
    await tx.insert(runSummaries).values({ runId: claim.run.id, workspaceId: claim.run.workspaceId, summary: out.summary, createdAt: now });
    const stored = await tx.select({ chainIndex: runChains.chainIndex }).from(runChains).where(eq(runChains.runId, claim.run.id)).orderBy(asc(runChains.chainIndex));
    const progress: FitProgress[] = stored.map((c) => ({ chain: c.chainIndex + 1, phase: 'done', iteration: out.total, total: out.total, itersPerSecond: 0 }));
    await tx
      .update(runs)
      .set({ status: 'done', finishedAt: now, leaseOwner: null, leaseExpiresAt: null, heartbeatAt: null, progress, timings, error: null, partial })
      .where(eq(runs.id, claim.run.id));
    await tx.update(runUnits).set({ status: 'done', finishedAt: now, leaseOwner: null, leaseExpiresAt: null }).where(eq(runUnits.id, claim.unit.id));
    return true;
  });
}

/** Fail the run of a unit this worker holds (its chains and waiting units go). */
export async function failUnitRun(db: Db, claim: Claim, workerId: string, message: string, now: Date): Promise<boolean> {
  return db.transaction(async (tx) => {
    if (!(await lockMine(tx, claim, workerId))) return false;
    await endRun(tx, claim.run.id, now, 'failed', message);
    return true;
  });
}

/** A run ends failed or cancelled: no draws shown, no unit left to claim. */
export async function endRun(tx: Exec, runId: string, now: Date, status: 'failed' | 'cancelled', error: string | null): Promise<void> {
  await tx
    .update(runs)
    .set({ status, finishedAt: now, leaseOwner: null, leaseExpiresAt: null, heartbeatAt: null, ...(error !== null ? { error: error.slice(0, 4000) } : {}) })
    .where(eq(runs.id, runId));
  await tx.delete(runChains).where(eq(runChains.runId, runId));
  await tx
    .update(runUnits)
    .set({ status: 'dropped', leaseOwner: null, leaseExpiresAt: null, finishedAt: now })
    .where(and(eq(runUnits.runId, runId), inArray(runUnits.status, ['queued', 'running'])));
}

/** Store the engine every chain of the run uses, unless a chain already did. */
export async function storePlan(db: Db, runId: string, plan: unknown): Promise<void> {
  await db.update(runs).set({ plan }).where(and(eq(runs.id, runId), isNull(runs.plan)));
}

/** The units of some runs (progress and liveness of running runs). */
export async function unitsOf(exec: Exec, runIds: string[]): Promise<UnitRow[]> {
  if (runIds.length === 0) return [];
  return exec.select().from(runUnits).where(inArray(runUnits.runId, runIds)).orderBy(asc(runUnits.runId), asc(runUnits.unit));
}
