/**
 * Chains as the unit of work, with real worker processes (`npm run worker`, server/runs/worker-main.ts)
 * on one database:
 *  - fairness: a big fit queued first in workspace A does not hold the slots against a 1-chain fit
 *    queued later in workspace B — B's chain is among the first claims after it is queued;
 *  - a worker killed with SIGKILL in the middle of a chain: another process runs that chain again
 *    (only that one) and the draws equal an uninterrupted fit's, byte for byte.
 * Order is read from the units' claim times; nothing here asserts on how long anything took.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { asc, eq } from 'drizzle-orm';
import { runChains, runs, runUnits } from '../../server/db/schema';
import { RunWorker } from '../../server/runs/worker';
import { createWorkspace } from '../helpers/http';
import { REPO_ROOT } from '../helpers/server';
import { notebookWorld, type NotebookWorld } from './notebook/setup';

let w: NotebookWorld;
let wsB: string;
let nbB: string;
const children: ChildProcess[] = [];
const outputs: string[] = [];

// An invented scenario: twelve shares of a field trial's plots, each at least 0 and together at
// most 8 units, normal beliefs around 1. Hit-and-run (a fixed engine: no pilots) with long chains,
// so a chain is still running when the test acts.
const SOURCE = 'unknown w[12]\nterm ld_normal(w, 1, 1)\nconstrain w >= 0\nconstrain sum(w) <= 8\n';
const LONG = { warmup: 12_000, draws: 12_000, seed: 777, sampler: 'hitrun' as const };

beforeAll(async () => {
  w = await notebookWorld();
  wsB = await createWorkspace(w.owner, 'Second trial');
  nbB = (await w.owner.post(`/api/workspaces/${wsB}/notebooks`, { title: 'B' })).body.notebook.id as string;
});
afterAll(async () => {
  for (const c of children) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
  await w.server.close();
});

function startWorker(name: string, env: Record<string, string> = {}): ChildProcess {
  const c = spawn(process.execPath, ['--import', 'tsx', 'server/runs/worker-main.ts'], {
    cwd: REPO_ROOT,
    env: { ...process.env, DATABASE_URL: w.server.db.url, FIT_SLOTS: '1', COMPUTE_THREADS: '1', RUN_POLL_MS: '100', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const k = outputs.push('') - 1;
  c.stdout!.on('data', (d) => (outputs[k] += d));
  c.stderr!.on('data', (d) => (outputs[k] += d));
  children.push(c);
  void name;
  return c;
}
const allOutput = () => outputs.join('\n----\n');

async function fitCell(ws: string, nb: string, chains: number, settings: typeof LONG = LONG): Promise<string> {
  const base = `/api/workspaces/${ws}/notebooks/${nb}`;
  const model = (await w.owner.post(`${base}/cells`, { kind: 'model', source: SOURCE })).body.cell;
  const fit = (await w.owner.post(`${base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings: { ...settings, chains } } })).body.cell;
  return fit.id as string;
}
async function queue(ws: string, nb: string, cellId: string): Promise<string> {
  const res = await w.owner.post(`/api/workspaces/${ws}/notebooks/${nb}/cells/${cellId}/runs`, {});
  if (res.status !== 201) throw new Error(`queue: ${res.status} ${res.text}`);
  return res.body.run.id as string;
}
const unitsOf = (runId: string) => w.server.db.db.select().from(runUnits).where(eq(runUnits.runId, runId)).orderBy(asc(runUnits.unit));
async function waitFor<T>(what: string, fn: () => Promise<T | null | undefined | false>, timeoutMs = 240_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}:\n${allOutput()}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
const statusOf = async (id: string) => (await w.server.db.db.select({ s: runs.status }).from(runs).where(eq(runs.id, id)))[0].s;

describe('chains are the unit of work across worker processes', () => {
  it('a 1-chain fit queued later in another workspace takes the next free slot, not the big fit\'s next chain', async () => {
    const cellA = await fitCell(w.ws, w.nb, 8);
    const cellB = await fitCell(wsB, nbB, 1);
    const p1 = startWorker('p1');
    const p2 = startWorker('p2');
    const a = await queue(w.ws, w.nb, cellA);
    // Both slots busy with A's chains before B arrives.
    await waitFor('two chains of A running', async () => (await unitsOf(a)).filter((u) => u.status === 'running').length === 2);
    w.server.clock.advance(1_000);
    const queuedB = new Date();
    const b = await queue(wsB, nbB, cellB);
    await waitFor('B done', async () => (await statusOf(b)) === 'done');
    const [unitB] = await unitsOf(b);
    const claimsA = (await unitsOf(a)).filter((u) => u.kind === 'chain' && u.claimedAt);
    // Claims of A's chains between B's queueing and B's claim: at most one, made by the other
    // slot freed at the same moment (2 slots, so B waits for at most one chain's end).
    const overtaking = claimsA.filter((u) => u.claimedAt!.getTime() >= queuedB.getTime() && u.claimedAt!.getTime() < unitB.claimedAt!.getTime());
    expect(overtaking.length, allOutput()).toBeLessThanOrEqual(1);
    // The big fit finishes too, with all its chains; most of them were claimed after B's (it did
    // not run to its end first): all but the two running when B came and at most one more.
    await waitFor('A done', async () => (await statusOf(a)) === 'done');
    const claimedAfterB = (await unitsOf(a)).filter((u) => u.kind === 'chain' && u.claimedAt!.getTime() > unitB.claimedAt!.getTime());
    expect(claimedAfterB.length, allOutput()).toBeGreaterThanOrEqual(8 - 2 - 1);
    expect((await w.server.db.db.select({ c: runChains.chainIndex }).from(runChains).where(eq(runChains.runId, a))).length).toBe(8);
    p1.kill('SIGTERM');
    p2.kill('SIGTERM');
    await Promise.all([p1, p2].map((p) => new Promise((r) => (p.exitCode !== null ? r(null) : p.once('exit', r)))));
  }, 300_000);

  it('a worker killed mid-chain: another process runs only that chain again, with identical draws', async () => {
    const db = w.server.db.db;
    // Longer chains, and progress written every 100 ms, so the kill lands inside a chain.
    const cell = await fitCell(w.ws, w.nb, 3, { ...LONG, warmup: 20_000, draws: 20_000 });
    // Reference: the same fit (same settings and seed) run to its end by one worker in this process.
    const ref = await queue(w.ws, w.nb, cell);
    const inProcess = new RunWorker({ db, parallel: false, log: () => {} });
    while (await inProcess.runOnce()) {
      /* every unit of the reference */
    }
    expect(await statusOf(ref)).toBe('done');
    const refChains = await db.select().from(runChains).where(eq(runChains.runId, ref)).orderBy(asc(runChains.chainIndex));

    const env = { RUN_LEASE_MS: '3000', RUN_HEARTBEAT_MS: '500', RUN_PROGRESS_MS: '100' };
    const p1 = startWorker('victim', env);
    const id = await queue(w.ws, w.nb, cell);
    // Chain 2 in the middle of its iterations (its progress written, not finished).
    const victim = await waitFor('chain 2 mid-way', async () => {
      const u = (await unitsOf(id)).find((x) => x.unit === 1);
      const p = Array.isArray(u?.progress) ? (u!.progress as { iteration: number; total: number }[])[0] : undefined;
      return u?.status === 'running' && p && p.iteration > 0 && p.iteration < p.total ? u : null;
    });
    p1.kill('SIGKILL');
    await new Promise((r) => (p1.exitCode !== null || p1.signalCode !== null ? r(null) : p1.once('exit', r)));
    const before = await unitsOf(id);
    expect(before.find((u) => u.unit === 0)?.status).toBe('done');
    const chain1Row = (await db.select().from(runChains).where(eq(runChains.runId, id))).find((c) => c.chainIndex === 0)!;

    startWorker('rescuer', env);
    await waitFor('the fit done', async () => (await statusOf(id)) === 'done');
    const after = await unitsOf(id);
    // Chain 1 was not run again; chain 2 ran a second time (after its lease expired); chain 3 once.
    expect(after.filter((u) => u.kind === 'chain').map((u) => [u.unit, u.attempts])).toEqual([[0, 1], [1, 2], [2, 1]]);
    expect(after.find((u) => u.unit === 1)!.claimedAt!.getTime()).toBeGreaterThan(victim.claimedAt!.getTime());
    const got = await db.select().from(runChains).where(eq(runChains.runId, id)).orderBy(asc(runChains.chainIndex));
    expect(got.map((c) => c.chainIndex)).toEqual([0, 1, 2]);
    expect(got[0].id).toBe(chain1Row.id);
    // Same seed and chain index give the same draws whatever process or thread runs the chain
    // (the engine's reproducibility contract): byte-identical to the uninterrupted fit.
    for (let k = 0; k < 3; k++) expect(got[k].draws.equals(refChains[k].draws), `chain ${k + 1}`).toBe(true);
    expect((await w.owner.get(`/api/workspaces/${w.ws}/runs/${id}`)).body.run.summary.quantities).toEqual(
      (await w.owner.get(`/api/workspaces/${w.ws}/runs/${ref}`)).body.run.summary.quantities,
    );
  }, 300_000);
});
