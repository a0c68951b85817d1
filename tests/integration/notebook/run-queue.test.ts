/**
 * The run status a page reads while a fit waits or runs: the queue position (fair between
 * workspaces), a lost worker, and a fit that reached the time limit kept as partial.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { asc, eq, inArray } from 'drizzle-orm';
import { runChains, runs, runSummaries, runUnits } from '../../../server/db/schema';
import { ManualClock } from '../../../server/lib/clock';
import { newId } from '../../../server/lib/ids';
import { claimOrder } from '../../../server/runs/queue';
import { claimUnit, failUnitRun, heartbeatUnit, unitsFor } from '../../../server/runs/units';
import { decodeDraws } from '../../../server/runs/draws-codec';
import { RunWorker } from '../../../server/runs/worker';
import { RUN_HEARTBEAT } from '../../../shared/api/notebook';
import { createWorkspace } from '../../helpers/http';
import { notebookWorld, type NotebookWorld } from './setup';

let w: NotebookWorld;
let other: { ws: string; nb: string };
beforeAll(async () => {
  w = await notebookWorld();
  const ws = await createWorkspace(w.owner, 'Second lab');
  const nb = (await w.owner.post(`/api/workspaces/${ws}/notebooks`, { title: 'Other' })).body.notebook.id as string;
  other = { ws, nb };
});
afterAll(() => w.server.close());

const settings = { chains: 3, warmup: 150, draws: 200, seed: 4242, sampler: 'auto' as const };
// An invented scenario: sediment depth (cm) in a core, normal belief bounded to 0–5 cm.
const spec = { source: 'unknown depth\nterm ld_normal(depth, 2, 1)\nconstrain depth >= 0\nconstrain depth <= 5\n', tables: {} };

async function queue(ws: string, nb: string, createdAt: Date): Promise<string> {
  const id = newId();
  const row = {
    id, workspaceId: ws, notebookId: nb, cellId: null, status: 'queued' as const, settings, seed: settings.seed,
    modelHash: '2'.repeat(64), spec, progress: [], attempts: 0, createdAt,
  };
  await w.server.db.db.insert(runs).values(row);
  // One unit per chain, as queueRun makes them.
  await w.server.db.db.insert(runUnits).values(unitsFor(row));
  return id;
}
const getRun = async (ws: string, id: string) => (await w.owner.get(`/api/workspaces/${ws}/runs/${id}`)).body.run;
const clearQueue = async () => {
  const db = w.server.db.db;
  await db.update(runs).set({ status: 'cancelled' }).where(inArray(runs.status, ['queued', 'running']));
};

describe('queue order and position', () => {
  it('takes one run per workspace in turn, oldest first, and shows each queued run its place', async () => {
    const db = w.server.db.db;
    const t0 = w.server.clock.now().getTime() - 60_000;
    const a1 = await queue(w.ws, w.nb, new Date(t0));
    const a2 = await queue(w.ws, w.nb, new Date(t0 + 1000));
    const b1 = await queue(other.ws, other.nb, new Date(t0 + 2000));
    // Round-robin: workspace A's second run waits behind workspace B's first, though B's is newer.
    const order = (await claimOrder(db, w.server.clock.now(), null)).map((r) => r.id);
    expect(order).toEqual([a1, b1, a2]);
    expect([(await getRun(w.ws, a1)).queuePosition, (await getRun(other.ws, b1)).queuePosition, (await getRun(w.ws, a2)).queuePosition]).toEqual([1, 2, 3]);
    expect((await getRun(w.ws, a1)).worker).toBeNull();

    // A running chain of workspace A counts as its turn, and A was served last: B's chains come
    // before A's next one.
    const claimed = await claimUnit(db, 'w-a', w.server.clock.now(), 60_000);
    expect([claimed?.run.id, claimed?.unit.unit]).toEqual([a1, 0]);
    expect((await claimOrder(db, w.server.clock.now(), null)).map((r) => r.id)).toEqual([b1, a1, a2]);
    expect((await getRun(other.ws, b1)).queuePosition).toBe(1);
    expect((await getRun(w.ws, a2)).queuePosition).toBe(3);
    const running = await getRun(w.ws, a1);
    expect(running.queuePosition).toBeNull();
    expect(running.worker).toBe('active');
    await clearQueue();
  });
});

describe('fit slots', () => {
  it('a worker with two slots runs chains of two workspaces at once, a workspace\'s runs oldest first', async () => {
    const db = w.server.db.db;
    await clearQueue();
    const t0 = w.server.clock.now().getTime() - 10_000;
    const a1 = await queue(w.ws, w.nb, new Date(t0));
    const a2 = await queue(w.ws, w.nb, new Date(t0 + 1));
    const b1 = await queue(other.ws, other.nb, new Date(t0 + 2));
    const logs: string[] = [];
    const worker = new RunWorker({ db, slots: 2, parallel: false, pollMs: 50, progressMs: 0, log: (m) => logs.push(m) });
    worker.start();
    const deadline = Date.now() + 120_000;
    for (;;) {
      const rows = await db.select({ status: runs.status }).from(runs).where(inArray(runs.id, [a1, a2, b1]));
      if (rows.every((r) => r.status === 'done')) break;
      if (Date.now() > deadline) throw new Error(`runs did not finish:\n${logs.join('\n')}`);
      await new Promise((r) => setTimeout(r, 100));
    }
    await worker.stop();
    const claims = logs.map((m) => /slot (\d): claimed chain (\d) of run (\w+)/.exec(m)).filter((m) => m !== null);
    expect(claims).toHaveLength(9);
    // The first two claims are one chain of each workspace, on different slots.
    expect(new Set(claims.slice(0, 2).map((m) => m[3]))).toEqual(new Set([a1, b1]));
    expect(new Set(claims.slice(0, 2).map((m) => m[1]))).toEqual(new Set(['1', '2']));
    // Within workspace A, the older run's chains go first.
    const lastA1 = claims.map((m) => m[3]).lastIndexOf(a1);
    const firstA2 = claims.map((m) => m[3]).indexOf(a2);
    expect(lastA1).toBeLessThan(firstA2);
  });
});

describe('a lost worker', () => {
  it('shows as lost when its heartbeat is stale or its lease expired, and as active again after a beat', async () => {
    const db = w.server.db.db;
    const now = w.server.clock.now();
    const id = await queue(w.ws, w.nb, now);
    const silent = await claimUnit(db, 'silent', now, 60_000);
    const fresh = await getRun(w.ws, id);
    expect(fresh.worker).toBe('active');
    expect(fresh.lastHeartbeatAt).toBe(now.toISOString());
    // No beat for longer than the stale time (the lease itself still runs).
    w.server.clock.advance(RUN_HEARTBEAT.staleMs + 1_000);
    expect((await getRun(w.ws, id)).worker).toBe('lost');
    expect(await heartbeatUnit(db, silent!, 'silent', w.server.clock.now(), 60_000)).toBe(true);
    expect((await getRun(w.ws, id)).worker).toBe('active');
    // The lease runs out.
    w.server.clock.advance(61_000);
    const lost = await getRun(w.ws, id);
    expect(lost.status).toBe('running');
    expect(lost.worker).toBe('lost');
    expect(await failUnitRun(db, silent!, 'silent', 'test', w.server.clock.now())).toBe(true);
    expect((await getRun(w.ws, id)).worker).toBeNull();
  });
});

describe('the time limit', () => {
  it('keeps the chains that finished and marks the run partial, summarised over those chains', async () => {
    const db = w.server.db.db;
    await clearQueue();
    const clock = new ManualClock(new Date('2026-12-02T09:00:00Z'));
    const id = await queue(w.ws, w.nb, clock.now());
    // A first worker runs chain 1.
    const first = new RunWorker({ db, clock, workerId: 'first', parallel: false, progressMs: 0, heartbeatMs: 60_000, log: () => {} });
    expect(await first.runOnce()).toBe(true);
    // The next worker's time limit passes before its chains can finish: both are dropped, and the
    // slot that dropped the last one summarises the fit over the chain that finished.
    const logs: string[] = [];
    const second = new RunWorker({ db, clock, workerId: 'second', parallel: false, progressMs: 0, heartbeatMs: 60_000, wallSeconds: 0, log: (m) => logs.push(m) });
    expect(await second.runOnce()).toBe(true);
    expect(await second.runOnce()).toBe(true);
    expect(await second.runOnce()).toBe(false);
    const [row] = await db.select().from(runs).where(eq(runs.id, id));
    expect(row.status).toBe('done');
    expect(row.partial).toBe(true);
    expect(logs.some((m) => /kept 1 of 3 chains \(partial\)/.test(m))).toBe(true);
    const chains = await db.select().from(runChains).where(eq(runChains.runId, id)).orderBy(asc(runChains.chainIndex));
    expect(chains.map((c) => c.chainIndex)).toEqual([0]);
    const api = await getRun(w.ws, id);
    expect(api.partial).toBe(true);
    expect(api.summary.settings.chains).toBe(1);
    expect(api.settings.chains).toBe(3);
    // The summary's mean is the sample mean of the kept draws (the definition of the mean).
    const draws = decodeDraws(chains[0].draws, chains[0].drawCount, chains[0].dimension);
    let sum = 0;
    for (const v of draws) sum += v;
    const [s] = await db.select().from(runSummaries).where(eq(runSummaries.runId, id));
    const mean = (s.summary as { quantities: { mean: number }[] }).quantities[0].mean;
    expect(Math.abs(mean - sum / draws.length)).toBeLessThan(1e-12 * Math.max(1, Math.abs(mean)));
    // Draws and export work for a partial run like any done run.
    expect((await w.viewer.get(`/api/workspaces/${w.ws}/runs/${id}/draws`)).status).toBe(200);
  });
});
