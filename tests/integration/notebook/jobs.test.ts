/**
 * Runs as jobs: a run's chains are units claimed with SKIP LOCKED, each with its own lease and
 * heartbeat; expiry and requeue of one chain, cancel, give up after too many lost leases, chains
 * stored as they finish and a lost chain run again alone, and one fit end to end on a tiny model
 * through a real worker.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { asc, eq } from 'drizzle-orm';
import Papa from 'papaparse';
import { runChains, runs, runSummaries, runUnits } from '../../../server/db/schema';
import { ManualClock } from '../../../server/lib/clock';
import { newId } from '../../../server/lib/ids';
import { storedChains } from '../../../server/runs/queue';
import { claimUnit, endChainUnit, failUnitRun, heartbeatUnit, writeUnitProgress } from '../../../server/runs/units';
import { RunWorker } from '../../../server/runs/worker';
import { RUN_LIMITS } from '../../../shared/api/notebook';
import { decodeRunDraws, DRAWS_CONTENT_TYPE } from '../../../shared/draws-binary';
import { drawsCsvHeader, drawsCsvRows } from '../../../shared/export-csv';
import { decodeDraws } from '../../../server/runs/draws-codec';
import { drawsEncodings, streamRunDrawsCsv } from '../../../server/runs/read';
import { notebookWorld, postFile, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

const settings = { chains: 2, warmup: 200, draws: 300, seed: 11, sampler: 'auto' as const };
const oneChain = { ...settings, chains: 1 };

async function queueRaw(createdAt: Date, s: typeof settings = settings): Promise<string> {
  const id = newId();
  await w.server.db.db.insert(runs).values({
    id, workspaceId: w.ws, notebookId: w.nb, cellId: null, status: 'queued', settings: s, seed: s.seed,
    modelHash: '0'.repeat(64), spec: { source: 'unknown a', tables: {} }, progress: [], attempts: 0, createdAt,
  });
  return id;
}
const rowOf = async (id: string) => (await w.server.db.db.select().from(runs).where(eq(runs.id, id)))[0];
const unitsOfRun = (id: string) => w.server.db.db.select().from(runUnits).where(eq(runUnits.runId, id)).orderBy(asc(runUnits.unit));
/** Runs units until the queue has nothing claimable. */
async function drain(worker: RunWorker): Promise<number> {
  let n = 0;
  while (await worker.runOnce()) n++;
  return n;
}

describe('queue', () => {
  it('concurrent claims take different chains of a run (SKIP LOCKED), each with its own lease', async () => {
    const t0 = new Date('2026-12-01T10:00:00Z');
    const a = await queueRaw(new Date(t0.getTime() - 2000));
    const [x, y] = await Promise.all([claimUnit(w.server.db.db, 'w1', t0, 30_000), claimUnit(w.server.db.db, 'w2', t0, 30_000)]);
    expect([x?.run.id, y?.run.id]).toEqual([a, a]);
    expect(new Set([x?.unit.unit, y?.unit.unit])).toEqual(new Set([0, 1]));
    expect(await claimUnit(w.server.db.db, 'w3', t0, 30_000)).toBeNull();
    const ra = await rowOf(a);
    expect(ra.status).toBe('running');
    const units = await unitsOfRun(a);
    expect(units.map((u) => [u.kind, u.status, u.attempts])).toEqual([['chain', 'running', 1], ['chain', 'running', 1]]);
    expect(units.every((u) => u.leaseExpiresAt!.getTime() === t0.getTime() + 30_000)).toBe(true);
    expect(await failUnitRun(w.server.db.db, x!, 'w1', 'test', t0)).toBe(true);
    // The other chain's holder is fenced out once the run failed.
    expect(await heartbeatUnit(w.server.db.db, y!, 'w2', t0, 30_000)).toBe(false);
  });

  it('a heartbeat extends a chain\'s lease; an expired lease returns that chain to another worker, fencing the first', async () => {
    const db = w.server.db.db;
    const t0 = new Date('2026-12-01T11:00:00Z');
    const id = await queueRaw(t0, oneChain);
    const claimed = await claimUnit(db, 'first', t0, 10_000);
    expect(claimed?.run.id).toBe(id);
    expect(await heartbeatUnit(db, claimed!, 'first', new Date(t0.getTime() + 5_000), 10_000)).toBe(true);
    expect((await unitsOfRun(id))[0].leaseExpiresAt!.getTime()).toBe(t0.getTime() + 15_000);
    expect(await claimUnit(db, 'second', new Date(t0.getTime() + 14_000), 10_000)).toBeNull();
    const later = new Date(t0.getTime() + 16_000);
    const taken = await claimUnit(db, 'second', later, 10_000);
    expect(taken?.unit.id).toBe(claimed!.unit.id);
    expect(taken?.unit.attempts).toBe(2);
    expect(await heartbeatUnit(db, claimed!, 'first', later, 10_000)).toBe(false);
    expect(await writeUnitProgress(db, claimed!, 'first', [])).toBe(false);
    expect(await failUnitRun(db, claimed!, 'first', 'late', later)).toBe(false);
    expect((await unitsOfRun(id))[0].leaseOwner).toBe('second');
    await failUnitRun(db, taken!, 'second', 'test', later);
  });

  it(`gives a run up after a chain lost its lease ${RUN_LIMITS.maxAttempts} times`, async () => {
    const db = w.server.db.db;
    let t = new Date('2026-12-01T12:00:00Z').getTime();
    const id = await queueRaw(new Date(t), oneChain);
    for (let k = 0; k < RUN_LIMITS.maxAttempts; k++) {
      const c = await claimUnit(db, `w${k}`, new Date(t), 1_000);
      expect(c?.run.id).toBe(id);
      t += 2_000; // the worker vanished
    }
    expect(await claimUnit(db, 'last', new Date(t), 1_000)).toBeNull();
    const row = await rowOf(id);
    expect(row.status).toBe('failed');
    expect(row.error).toMatch(/chain 1 stopped answering 3 times/);
  });

  it('cancelling a queued run takes its chains off the queue; cancelling a running one fences its workers', async () => {
    const db = w.server.db.db;
    const t0 = new Date('2026-12-01T13:00:00Z');
    const q = await queueRaw(t0);
    const res = await w.editor.post(`/api/workspaces/${w.ws}/runs/${q}/cancel`, {});
    expect(res.status).toBe(200);
    expect(res.body.run.status).toBe('cancelled');
    expect(await claimUnit(db, 'w', t0, 10_000)).toBeNull();
    const r = await queueRaw(t0);
    const busy = await claimUnit(db, 'busy', t0, 10_000);
    expect((await w.editor.post(`/api/workspaces/${w.ws}/runs/${r}/cancel`, {})).body.run.status).toBe('cancelled');
    expect(await heartbeatUnit(db, busy!, 'busy', t0, 10_000)).toBe(false);
    expect(await claimUnit(db, 'w', t0, 10_000)).toBeNull();
    expect((await w.editor.post(`/api/workspaces/${w.ws}/runs/${r}/cancel`, {})).status).toBe(409);
  });
});

describe('chains stored as they finish; a lost chain runs again alone', () => {
  // An invented scenario: sediment depth (cm) settling in a river bend, a normal belief bounded to
  // the 0–5 cm a core sampler can hold. The model is tiny; what is checked is the bookkeeping.
  const spec = { source: 'unknown depth\nterm ld_normal(depth, 2, 1)\nconstrain depth >= 0\nconstrain depth <= 5\n', tables: {} };
  const resumeSettings = { chains: 3, warmup: 150, draws: 200, seed: 4242, sampler: 'auto' as const };
  const clock = new ManualClock(new Date('2026-12-01T14:00:00Z'));

  async function queueFit(): Promise<string> {
    const id = newId();
    await w.server.db.db.insert(runs).values({
      id, workspaceId: w.ws, notebookId: w.nb, cellId: null, status: 'queued', settings: resumeSettings, seed: resumeSettings.seed,
      modelHash: '1'.repeat(64), spec, progress: [], attempts: 0, createdAt: clock.now(),
    });
    return id;
  }
  const chainsOf = (id: string) => w.server.db.db.select().from(runChains).where(eq(runChains.runId, id)).orderBy(asc(runChains.chainIndex));
  const summaryOf = async (id: string) => (await w.server.db.db.select().from(runSummaries).where(eq(runSummaries.runId, id)))[0].summary as unknown as {
    quantities: unknown; diagnostics: unknown; verdict: unknown;
  };
  const finishedNumbers = (logs: string[]) => logs.map((m) => /chain (\d+) finished$/.exec(m)?.[1]).filter((x) => x !== undefined).map(Number);

  it('another worker runs only the lost chain; the draws equal an uninterrupted fit; a fenced-out write is refused', async () => {
    const db = w.server.db.db;
    // Reference: the same fit, every chain on one worker.
    const ref = await queueFit();
    const whole = new RunWorker({ db, clock, parallel: false, progressMs: 0, heartbeatMs: 60_000, log: () => {} });
    // Three chains, then the summary by the slot that stored the last chain (no separate claim).
    expect(await drain(whole)).toBe(3);
    expect((await rowOf(ref)).status).toBe('done');
    const refChains = await chainsOf(ref);
    expect(refChains.map((c) => c.chainIndex)).toEqual([0, 1, 2]);

    const id = await queueFit();
    // A worker claims chain 1 and vanishes (its lease runs on until it expires).
    const ghost = await claimUnit(db, 'ghost', clock.now(), 60_000);
    expect([ghost?.run.id, ghost?.unit.unit]).toEqual([id, 0]);
    const logsB: string[] = [];
    const second = new RunWorker({ db, clock, workerId: 'second', parallel: false, progressMs: 0, heartbeatMs: 60_000, log: (m) => logsB.push(m) });
    // The other chains run at once; the lost one waits for its lease.
    expect(await drain(second)).toBe(2);
    expect(finishedNumbers(logsB)).toEqual([2, 3]);
    expect((await rowOf(id)).status).toBe('running');
    expect((await chainsOf(id)).map((c) => c.chainIndex)).toEqual([1, 2]);
    const kept = await chainsOf(id);
    clock.advance(120_000);
    expect(await drain(second)).toBe(1);
    expect(finishedNumbers(logsB)).toEqual([2, 3, 1]);
    expect(logsB.some((m) => m.includes(`claimed chain 1 of run ${id} (attempt 2)`))).toBe(true);
    const done = await rowOf(id);
    expect(done.status).toBe('done');
    const all = await chainsOf(id);
    expect(all.map((c) => c.chainIndex)).toEqual([0, 1, 2]);
    // The rows stored before the lost chain ran again were kept as they were.
    for (const k of kept) expect(all.find((c) => c.chainIndex === k.chainIndex)?.id).toBe(k.id);
    // Every chain's draws equal the uninterrupted fit's, byte for byte (same seed and chain index
    // give the same draws: the engine's reproducibility contract), as does the summary.
    for (let k = 0; k < 3; k++) {
      expect(all[k].draws.equals(refChains[k].draws)).toBe(true);
      expect(all[k].stats).toEqual(refChains[k].stats);
    }
    const [sRef, sRes] = [await summaryOf(ref), await summaryOf(id)];
    expect(sRes.quantities).toEqual(sRef.quantities);
    expect(sRes.diagnostics).toEqual(sRef.diagnostics);
    expect(sRes.verdict).toEqual(sRef.verdict);
    expect((done.progress as { phase: string }[]).map((p) => p.phase)).toEqual(['done', 'done', 'done']);
    const [csvRef, csvRes] = await Promise.all([ref, id].map((r) => w.viewer.get(`/api/workspaces/${w.ws}/runs/${r}/draws.csv`)));
    expect(csvRes.status).toBe(200);
    expect(Papa.parse<string[]>(csvRes.text.trim()).data.length - 1).toBe(resumeSettings.chains * resumeSettings.draws);
    expect(csvRes.text).toBe(csvRef.text);

    // The fenced-out ghost's late chain write is refused and changes nothing.
    const late = (await storedChains(db, { id, workspaceId: w.ws }))[0];
    late.draws.fill(0);
    const names = { unknownNames: ['depth'], derivedNames: [] };
    expect((await endChainUnit(db, ghost!, 'ghost', { names, chain: late }, clock.now(), 60_000)).mine).toBe(false);
    const after = await chainsOf(id);
    expect(after.map((c) => c.id)).toEqual(all.map((c) => c.id));
    expect(after[0].draws.equals(refChains[0].draws)).toBe(true);
  });

  it('a cancelled or failed run drops the chains it stored, and its workers can store no more', async () => {
    const db = w.server.db.db;
    for (const end of ['cancel', 'fail'] as const) {
      const id = await queueFit();
      const worker = new RunWorker({ db, clock, workerId: `w-${end}`, parallel: false, progressMs: 0, heartbeatMs: 60_000, log: () => {} });
      expect(await worker.runOnce()).toBe(true);
      const kept = await storedChains(db, { id, workspaceId: w.ws });
      expect(kept.map((c) => c.chain)).toEqual([0]);
      const holder = await claimUnit(db, `h-${end}`, clock.now(), 60_000);
      expect(holder?.unit.unit).toBe(1);
      if (end === 'cancel') expect((await w.editor.post(`/api/workspaces/${w.ws}/runs/${id}/cancel`, {})).body.run.status).toBe('cancelled');
      else expect(await failUnitRun(db, holder!, `h-${end}`, 'test', clock.now())).toBe(true);
      expect(await chainsOf(id)).toHaveLength(0);
      const names = { unknownNames: ['depth'], derivedNames: [] };
      expect((await endChainUnit(db, holder!, `h-${end}`, { names, chain: { ...kept[0], chain: 1 } }, clock.now(), 60_000)).mine).toBe(false);
      expect(await chainsOf(id)).toHaveLength(0);
      expect(await worker.runOnce()).toBe(false);
      expect((await w.viewer.get(`/api/workspaces/${w.ws}/runs/${id}/draws`)).status).toBe(404);
    }
  });
});

describe('a fit end to end', () => {
  it('queues from a fit cell, runs on a worker, reports progress, then summary, draws and CSV exports', async () => {
    // A small invented scenario: cups of coffee brewed per morning at a tasting bar, Poisson with
    // a rate bounded below by 1 — our own made-up data.
    const csv = 'cups\n3\n5\n4\n6\n2\n5\n4\n';
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'cups.csv', text: csv }, { name: 'tasting' });
    expect(up.status).toBe(201);
    await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: up.body.dataset.id } });
    const model = (
      await w.editor.post(`${w.base}/cells`, {
        kind: 'model',
        source: '# Brew rate\ntable tasting\nunknown rate\nterm ld_poisson(cups, rate) + ld_gamma(rate, 2, 0.5)\nconstrain rate >= 1\nconstrain rate <= 20\n',
      })
    ).body.cell;
    const fit = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings } })).body.cell;
    const created = await w.editor.post(`${w.base}/cells/${fit.id}/runs`, {});
    expect(created.status).toBe(201);
    const runId = created.body.run.id;
    expect(created.body.run.status).toBe('queued');
    // Reviewers cannot start fits.
    expect((await w.reviewer.post(`${w.base}/cells/${fit.id}/runs`, {})).status).toBe(403);

    const worker = new RunWorker({ db: w.server.db.db, parallel: false, progressMs: 0, heartbeatMs: 1000, log: () => {} });
    // One unit per chain; the slot that stores the last chain summarises the fit.
    expect(await drain(worker)).toBe(settings.chains);

    const got = await w.viewer.get(`/api/workspaces/${w.ws}/runs/${runId}`);
    expect(got.status).toBe(200);
    const run = got.body.run;
    expect(run.status).toBe('done');
    expect(run.progress.map((p: { phase: string }) => p.phase)).toEqual(['done', 'done']);
    expect(run.summary.quantities.map((q: { name: string }) => q.name)).toEqual(['rate']);
    // Every draw respects the constraints; the posterior mean lies inside them.
    const rate = run.summary.quantities[0];
    expect(rate.q5).toBeGreaterThanOrEqual(1);
    expect(rate.q95).toBeLessThanOrEqual(20);

    const list = await w.viewer.get(`${w.base}/cells/${fit.id}/runs`);
    expect(list.body.runs[0].id).toBe(runId);

    // The plots' draws: Float32 columns after a JSON header, for members and share-link visitors alike.
    const drawsOf = async (path: string, cookie?: string) => {
      const res = await fetch(w.viewer.baseUrl + path, { headers: cookie ? { cookie } : {} });
      expect(res.status).toBe(200);
      expect(res.headers.get('content-type')).toBe(DRAWS_CONTENT_TYPE);
      return { bytes: new Uint8Array(await res.arrayBuffer()) };
    };
    const member = await drawsOf(`/api/workspaces/${w.ws}/runs/${runId}/draws?max=100`, w.viewer.cookieHeader);
    const draws = decodeRunDraws(member.bytes.slice().buffer);
    expect(draws.names).toEqual(['rate']);
    expect(draws.thin).toBe(3);
    expect(draws.chains).toHaveLength(2);
    expect(draws.chains[0].values[0].length).toBe(100);
    expect(draws.region!.A).toEqual([[-1], [1]]);
    // One unknown: no pair to project the region onto.
    expect(draws.projections).toEqual([]);
    // Each plotted value is the stored Float64 draw (every 3rd) rounded to Float32 (Math.fround: ECMAScript's binary32 rounding).
    const stored = await w.server.db.db.select().from(runChains).where(eq(runChains.runId, runId)).orderBy(asc(runChains.chainIndex));
    for (const [ci, c] of stored.entries()) {
      const all = decodeDraws(c.draws, c.drawCount, c.dimension);
      for (let i = 0; i < 100; i++) expect(draws.chains[ci].values[0][i]).toBe(Math.fround(all[i * 3 * c.dimension]));
    }
    // A second read is served from the cache: no second thinning on the compute pool.
    const encoded = drawsEncodings.count;
    expect((await drawsOf(`/api/workspaces/${w.ws}/runs/${runId}/draws?max=100`, w.viewer.cookieHeader)).bytes).toEqual(member.bytes);
    expect(drawsEncodings.count).toBe(encoded);
    const link = await w.owner.post(`${w.base}/share-links`, {});
    expect(link.status).toBe(201);
    const token = (link.body as { token: string }).token;
    const visitor = await drawsOf(`/api/share/${token}/runs/${runId}/draws?max=100`);
    expect(visitor.bytes).toEqual(member.bytes);
    expect((await w.viewer.get(`/api/share/${token}/runs/${newId()}/draws`)).status).toBe(404);

    const csvRes = await w.viewer.get(`/api/workspaces/${w.ws}/runs/${runId}/draws.csv`);
    expect(csvRes.status).toBe(200);
    expect(csvRes.headers.get('content-type')).toMatch(/text\/csv/);
    const rows = Papa.parse<string[]>(csvRes.text.trim()).data;
    expect(rows[0]).toEqual(['chain', 'iteration', 'rate']);
    expect(rows.length - 1).toBe(settings.chains * settings.draws);
    expect(rows.slice(1).every((r) => Number(r[2]) >= 1 && Number(r[2]) <= 20)).toBe(true);
    // The streamed file equals the file as it was written whole before (header, then each chain's rows),
    // through the route and in pieces of 7 rows (100 bytes of stored draws) alike.
    const whole = [drawsCsvHeader(['rate']), ...stored.flatMap((c) => [...drawsCsvRows(c.chainIndex + 1, decodeDraws(c.draws, c.drawCount, c.dimension), c.dimension, new Float64Array(0), 0)])].join('\n') + '\n';
    expect(csvRes.text).toBe(whole);
    const pieces: Uint8Array[] = [];
    await streamRunDrawsCsv(w.server.db.db, w.ws, runId, { begin: () => {}, write: async (b) => void pieces.push(b), end: () => {} }, 100);
    expect(pieces.length).toBe(2 * Math.ceil(settings.draws / 12));
    expect(Buffer.concat(pieces).toString('utf8')).toBe(whole);

    const sum = await w.viewer.get(`/api/workspaces/${w.ws}/runs/${runId}/summary.csv`);
    const srows = Papa.parse<string[]>(sum.text.trim()).data;
    expect(srows[0].slice(0, 5)).toEqual(['quantity', 'origin', 'median', 'interval90_low', 'interval90_high']);
    expect(srows[1][0]).toBe('rate');
    expect(Number(srows[1][srows[0].indexOf('posterior_mean')])).toBeCloseTo(rate.mean, 10);
    expect(Number(srows[1][srows[0].indexOf('median')])).toBeCloseTo(rate.q50, 10);
  });

  it('refuses a fit whose model binds a table no data cell holds, and enforces the workspace limit', async () => {
    const model = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: 'table nowhere\nunknown a\nterm ld_normal(a, 0, 1)' })).body.cell;
    const fit = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings } })).body.cell;
    const res = await w.editor.post(`${w.base}/cells/${fit.id}/runs`, {});
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/table "nowhere"/);

    const ok = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: 'unknown a\nterm ld_normal(a, 0, 1)\nconstrain a >= 0' })).body.cell;
    const fit2 = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: ok.id, settings } })).body.cell;
    const made: number[] = [];
    for (let k = 0; k < 3; k++) made.push((await w.editor.post(`${w.base}/cells/${fit2.id}/runs`, {})).status);
    expect(made).toEqual([201, 201, 409]);
    const third = await w.editor.post(`${w.base}/cells/${fit2.id}/runs`, {});
    expect(third.body.error.message).toMatch(/already has 2 fits queued or running/);
  });
});
