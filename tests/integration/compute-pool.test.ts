/**
 * Nothing heavy on the main thread: model/region checks and table parsing run on the compute pool,
 * so /api/health keeps answering while they run; a check past the time limit is stopped with a
 * clear answer; the unknowns limit is the same for the model check and for a fit.
 *
 * The one timing check of the suite lives here, as required of this feature: health answers within
 * 100 ms while a big compile and a big CSV parse run. Everything else is behaviour.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MAX_UNKNOWNS } from '../../shared/fit';
import { closeComputePool, ComputePool, ComputeTimeoutError } from '../../server/compute/pool';
import { notebookWorld, postFile, type NotebookWorld } from './notebook/setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(async () => {
  await w.server.close();
  await closeComputePool();
});

/** x ≥ 0 and sum(x) ≤ 1 in n unknowns: a region check that takes seconds at a few hundred. */
const simplex = (n: number) => `unknown x[${n}]\nterm ld_normal(x, 0, 1)\nconstrain x >= 0\nconstrain sum(x) <= 1\n`;

/** The 95th percentile (nearest rank) of the latencies. */
const p95 = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.max(0, Math.ceil(0.95 * xs.length) - 1)];

/**
 * Health must answer within 100 ms while the heavy work runs. Judged on the 95th percentile: the
 * test machine's cores are shared (load averages above 10 were seen), so a single answer now and
 * then waits on the operating system's scheduler however free the event loop is; before the work
 * left the main thread, every answer during it waited for the whole check (seconds).
 */
function expectHealthy(latencies: number[]) {
  expect(latencies.length).toBeGreaterThan(3);
  expect(p95(latencies)).toBeLessThan(100);
}

/** Poll /api/health every 20 ms while `work` runs; the latencies seen, and how long work took. */
async function healthDuring<T>(work: () => Promise<T>): Promise<{ latencies: number[]; workMs: number; result: T }> {
  const latencies: number[] = [];
  let running = true;
  const poller = (async () => {
    while (running) {
      const t = performance.now();
      const res = await fetch(`${w.server.url}/api/health`);
      await res.arrayBuffer();
      latencies.push(performance.now() - t);
      expect(res.status).toBe(200);
      await new Promise((r) => setTimeout(r, 20));
    }
  })();
  const t0 = performance.now();
  const result = await work();
  const workMs = performance.now() - t0;
  running = false;
  await poller;
  return { latencies, workMs, result };
}

describe('the main thread stays free', () => {
  it('health answers within 100 ms while a 400-unknown region check runs', async () => {
    // The pool's first thread starts outside the measurement.
    expect((await w.editor.post(`/api/workspaces/${w.ws}/compile`, { source: simplex(2), region: true })).status).toBe(200);
    const { latencies, workMs, result } = await healthDuring(() => w.editor.post(`/api/workspaces/${w.ws}/compile`, { source: simplex(400), region: true }));
    expect(result.status).toBe(200);
    expect(result.body.region.status).toBe('interior');
    // The check itself is slow (seconds on this machine; ~5 s before it moved off the main thread).
    console.log(`compile: ${Math.round(workMs)} ms; health: ${latencies.length} answers, 95th percentile ${Math.round(p95(latencies))} ms, slowest ${Math.round(Math.max(...latencies))} ms`);
    expectHealthy(latencies);
  });

  it('health answers within 100 ms while a 4 MB CSV is parsed at upload and previewed', async () => {
    // 150,000 rows of three numeric columns (invented values).
    const lines = ['plot,yield_t,dose_kg,block'];
    for (let i = 0; i < 240_000; i++) lines.push(`${i + 1},${(20 + (i % 97) * 0.137).toFixed(3)},${(i % 5) * 40},b${i % 12}`);
    const csv = lines.join('\n') + '\n';
    expect(csv.length).toBeGreaterThan(4_000_000);
    const { latencies, workMs, result } = await healthDuring(() => postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'big.csv', text: csv }, { name: 'big' }));
    expect(result.status).toBe(201);
    expect(result.body.dataset.rows).toBe(240_000);
    expect(result.body.rows[0]).toEqual([1, 20, 0, 'b0']);
    console.log(`upload: ${Math.round(workMs)} ms; health: ${latencies.length} answers, 95th percentile ${Math.round(p95(latencies))} ms, slowest ${Math.round(Math.max(...latencies))} ms`);
    expectHealthy(latencies);
    // Reading it back (a fresh parse of the stored bytes, or the cache) keeps health free too.
    const again = await healthDuring(() => w.viewer.get(`/api/workspaces/${w.ws}/datasets/${result.body.dataset.id}`));
    expect(again.result.status).toBe(200);
    expect(again.result.body.rows[1]).toEqual([2, 20.137, 40, 'b1']);
  });
});

describe('one unknowns limit', () => {
  it(`the model check refuses more than ${MAX_UNKNOWNS} unknown coordinates before any region check, as a fit does`, async () => {
    const over = await w.editor.post(`/api/workspaces/${w.ws}/compile`, { source: `# many\n${simplex(MAX_UNKNOWNS + 1)}`, region: true });
    expect(over.status).toBe(200);
    expect(over.body.ok).toBe(false);
    expect(over.body.region.status).toBe('unchecked');
    const msg = over.body.messages.find((m: { severity: string }) => m.severity === 'error');
    expect(msg.message).toBe(`The model has ${MAX_UNKNOWNS + 1} unknown coordinates; at most ${MAX_UNKNOWNS} are allowed.`);
    expect(msg.line).toBe(2);
    // At the limit the check goes on (no region asked: the constraint count is what is checked).
    const at = await w.editor.post(`/api/workspaces/${w.ws}/compile`, { source: simplex(MAX_UNKNOWNS), region: false });
    expect(at.body.ok).toBe(true);
    expect(at.body.constraints).toEqual({ inequalities: MAX_UNKNOWNS + 1, equalities: 0 });

    // A fit of the larger model is refused with the same sentence.
    const made = await w.editor.post(`${w.base}/cells`, { kind: 'model', source: simplex(MAX_UNKNOWNS + 1) });
    expect(made.status, made.text).toBe(201);
    const model = made.body.cell;
    const fit = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings: { chains: 1, warmup: 100, draws: 100, seed: 1, sampler: 'auto' } } })).body.cell;
    const run = await w.editor.post(`${w.base}/cells/${fit.id}/runs`, {});
    expect(run.status).toBe(400);
    expect(run.body.error.message).toMatch(new RegExp(`${MAX_UNKNOWNS + 1} unknown coordinates; at most ${MAX_UNKNOWNS}`));
  });
});

describe('the time limit', () => {
  it('terminates a task past its limit, answers with ComputeTimeoutError, and goes on with a fresh thread', async () => {
    const pool = new ComputePool({ size: 1, timeoutMs: 300 });
    try {
      await expect(pool.run('checkModel', { source: simplex(400), tables: {}, region: true })).rejects.toBeInstanceOf(ComputeTimeoutError);
      const ok = await pool.run('checkModel', { source: simplex(2), tables: {}, region: true }, { timeoutMs: 20_000 });
      expect(ok.response.region.status).toBe('interior');
      expect(pool.threads()).toBe(1);
    } finally {
      await pool.close();
    }
  });

  it('the compile route answers 422 time_limit naming the limit', async () => {
    await closeComputePool();
    process.env.COMPUTE_TIMEOUT_MS = '300';
    try {
      const res = await w.editor.post(`/api/workspaces/${w.ws}/compile`, { source: simplex(400), region: true });
      expect(res.status).toBe(422);
      expect(res.body.error.code).toBe('time_limit');
      expect(res.body.error.message).toBe('Checking the model and its region took longer than its limit of 300 ms and was stopped.');
    } finally {
      delete process.env.COMPUTE_TIMEOUT_MS;
      await closeComputePool();
    }
  });
});
