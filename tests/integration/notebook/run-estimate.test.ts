/**
 * Up-front refusal: before a fit is queued, a short timed pilot on the compute pool estimates how
 * long one chain takes; a fit whose chains cannot finish within the per-chain limit is refused
 * through the API with the number of iterations per chain that would fit, and nothing is queued.
 * The limit here is made small (RUN_CHAIN_SECONDS = 0.2 s) so an ordinary fit crosses it.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { runs } from '../../../server/db/schema';
import { startApiServer } from '../../helpers/server';
import { notebookWorld, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld(await startApiServer({ config: { runChainSeconds: 0.2 } }));
});
afterAll(() => w.server.close());

// An invented scenario: twelve plot shares, each at least 0 and together at most 8.
const SOURCE = 'unknown w[12]\nterm ld_normal(w, 1, 1)\nconstrain w >= 0\nconstrain sum(w) <= 8\n';

async function fitCell(settings: Record<string, unknown>): Promise<string> {
  const model = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: SOURCE })).body.cell;
  return (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings } })).body.cell.id as string;
}

describe('a fit estimated to outrun the time limit', () => {
  it('is refused before queueing, saying how many iterations per chain would fit', async () => {
    const big = await fitCell({ chains: 2, warmup: 20_000, draws: 20_000, seed: 5, sampler: 'hitrun' });
    const res = await w.editor.post(`${w.base}/cells/${big}/runs`, {});
    expect(res.status).toBe(400);
    const msg: string = res.body.error.message;
    expect(msg).toMatch(/a chain may run at most 0\.20 s/);
    const m = /at most ~([\d,]+) iterations per chain/.exec(msg);
    expect(m, msg).not.toBeNull();
    const fits = Number(m![1].replace(/,/g, ''));
    // The suggestion is below what was asked (40,000 iterations per chain) and above the fewest allowed.
    expect(fits).toBeLessThan(40_000);
    expect(fits).toBeGreaterThanOrEqual(100);
    expect(await w.server.db.db.select().from(runs).where(eq(runs.cellId, big))).toHaveLength(0);

    // The suggested length (and less) is accepted and queued with its engine decided.
    const small = await fitCell({ chains: 2, warmup: Math.max(50, Math.floor(fits / 8)), draws: Math.max(50, Math.floor(fits / 8)), seed: 5, sampler: 'hitrun' });
    const ok = await w.editor.post(`${w.base}/cells/${small}/runs`, {});
    expect(ok.status, ok.text).toBe(201);
    const [row] = await w.server.db.db.select().from(runs).where(eq(runs.id, ok.body.run.id));
    expect((row.plan as { sampler: string }).sampler).toBe('hitrun');
  });
});
