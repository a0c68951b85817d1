/**
 * Compare jobs through the API and a real worker (server/runs/compare-job.ts): an editor queues the
 * comparison a compare cell describes, a RunWorker runs it on its thread, and every member reads log
 * Bayes factors with their standard errors and intervals, the tested region's masses, posterior
 * probabilities and leave-one-out differences from the models' fits.
 *
 * Truth values: normal data with known σ = 1 and N(0, 2²) priors on the means have the marginal
 * likelihood N(y; 0, I + 4 X Xᵀ) (conjugate normal model, "Bayesian Data Analysis", 3rd ed., CRC
 * Press 2013, ch. 2–3; determinant and inverse by ml-matrix); an ordering of three exchangeable
 * means has prior mass 1/3! (symmetry, common practice). Tolerances: 4 reported standard errors.
 * The evidence command with the model's seed gives the job's log Bayes factor (same numbers).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Matrix, determinant, inverse } from 'ml-matrix';
import { RunWorker } from '../../../server/runs/worker';
import { main } from '../../../server/engine/cli/evidence';
import { memoryIo } from '../../unit/fit/memory-io';
import { notebookWorld, postFile, type NotebookWorld } from './setup';

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

const y = [0.1, -0.4, 0.5, 0.9, 1.2, 1.0];
const g = ['a', 'a', 'b', 'b', 'c', 'c'];
const CSV = 'y,g\n' + y.map((v, i) => `${v},${g[i]}`).join('\n') + '\n';
const ORDERED = '# Ordered means\ntable d\nunknown mu[3]\nterm ld_normal(y, mu[g], 1)\nterm ld_normal(mu, 0, 2)\nconstrain mu[1] <= mu[2] <= mu[3]\n';
const ONE_MEAN = '# One mean\ntable d\nunknown m\nterm ld_normal(y, m, 1)\nterm ld_normal(m, 0, 2)\n';

function logMarginal(X: number[][]): number {
  const n = y.length;
  const S = Matrix.eye(n, n).add(new Matrix(X).mmul(new Matrix(X).transpose()).mul(4));
  const v = Matrix.columnVector(y);
  return -0.5 * (n * Math.log(2 * Math.PI) + Math.log(determinant(S)) + v.transpose().mmul(inverse(S)).mmul(v).get(0, 0));
}

describe('compare jobs', { timeout: 180_000 }, () => {
  it('queues, runs on a worker and reads Bayes factors, masses and leave-one-out', async () => {
    const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'd.csv', text: CSV }, { name: 'd' });
    expect(up.status).toBe(201);
    await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: up.body.dataset.id } });
    const ordered = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: ORDERED })).body.cell;
    const one = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: ONE_MEAN })).body.cell;
    const settings = { chains: 2, warmup: 300, draws: 400, seed: 5, sampler: 'auto' as const };
    const worker = new RunWorker({ db: w.server.db.db, parallel: false, progressMs: 0, heartbeatMs: 1000, log: () => {} });
    // Fits of both models (leave-one-out reads their draws).
    for (const m of [ordered, one]) {
      const fit = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: m.id, settings } })).body.cell;
      expect((await w.editor.post(`${w.base}/cells/${fit.id}/runs`, {})).status).toBe(201);
      // One unit per chain: the worker takes them one at a time; the last one finishes the fit.
      let units = 0;
      while (await worker.runOnce()) units++;
      expect(units).toBe(settings.chains);
    }
    const content = {
      modelCellIds: [ordered.id, one.id],
      hypotheses: [{ modelCellId: ordered.id, lines: [6] }],
      reference: { modelCellId: one.id, without: [] },
      replicates: 4,
      seed: 17,
    };
    const cell = (await w.editor.post(`${w.base}/cells`, { kind: 'compare', content })).body.cell;

    // Reviewers and viewers cannot queue; an editor can.
    expect((await w.reviewer.post(`${w.base}/cells/${cell.id}/compare-runs`, {})).status).toBe(403);
    const queued = await w.editor.post(`${w.base}/cells/${cell.id}/compare-runs`, { sensitivity: true });
    expect(queued.status).toBe(201);
    expect(queued.body.run.status).toBe('queued');
    expect(queued.body.run.settings.factors).toEqual([1, 0.5, 2]);
    expect(queued.body.run.queuePosition).toBe(1);
    // A compare job is not a fit: the fit routes do not show it.
    expect((await w.viewer.get(`/api/workspaces/${w.ws}/runs/${queued.body.run.id}`)).status).toBe(404);

    expect(await worker.runOnce()).toBe(true);
    const list = await w.viewer.get(`${w.base}/cells/${cell.id}/compare-runs`);
    expect(list.status).toBe(200);
    const run = list.body.runs[0];
    expect(run.status).toBe('done');
    expect(run.error).toBeNull();
    const r = run.result;
    expect(r.factors).toEqual([1, 0.5, 2]);
    const row = (id: string, without: number[] = []) => r.entries.find((e: { key: { modelCellId: string; without: number[] } }) => e.key.modelCellId === id && e.key.without.join() === without.join());

    // Marginal likelihoods (conjugate formula) and the tested region's prior mass (1/3!).
    const free = row(ordered.id, [6]);
    const oneRow = row(one.id);
    const groups = g.map((k) => ['a', 'b', 'c'].map((j) => (j === k ? 1 : 0)));
    expect(Math.abs(free.logML.value - logMarginal(groups))).toBeLessThanOrEqual(4 * free.logML.se);
    expect(Math.abs(oneRow.logML.value - logMarginal(g.map(() => [1])))).toBeLessThanOrEqual(4 * oneRow.logML.se);
    const h = r.hypotheses[0];
    expect(Math.abs(h.logPriorMass.value + Math.log(6))).toBeLessThanOrEqual(4 * h.logPriorMass.se);
    expect(h.logPosteriorMass.value).toBeLessThan(0);
    expect(h.interval[0]).toBeLessThan(h.logBF);
    expect(h.interval[1]).toBeGreaterThan(h.logBF);
    expect(h.sensitivity.map((s: { factor: number }) => s.factor)).toEqual([1, 0.5, 2]);
    expect(r.caution).toMatch(/depend on the priors/);
    expect(r.priorScales[0].lines[0].scaled).toEqual(['ld_normal (scale 2 × 0.5)']);

    // Leave-one-out from both fits, the one-mean model against the reference itself: the ordered
    // model's difference to it, with the SE of the pointwise differences.
    expect(r.looReference).toEqual({ modelCellId: one.id, without: [] });
    const lo = row(ordered.id).loo;
    expect(lo.elpd).toBeLessThan(0);
    expect(lo.diff).toBeCloseTo(lo.elpd - oneRow.loo.elpd, 9);
    expect(lo.diffSe).toBeGreaterThan(0);
    expect(lo.highKCount).toBe(lo.highK.length);
    expect(row(ordered.id, [6]).looNote).toMatch(/leave-one-out needs draws/);
    const ps = r.entries.reduce((s: number, e: { posteriorProbability: number }) => s + e.posteriorProbability, 0);
    expect(ps).toBeCloseTo(1, 12);

    // The evidence command with the model's seed (first model: the cell's seed) prints the same number.
    const io = memoryIo({ 'm.slk': ORDERED, 'd.csv': CSV });
    expect(await main(['m.slk', '--data', 'd.csv', '--hypothesis', '6', '--seed', '17', '--replicates', '4', '--json'], io)).toBe(0);
    expect(JSON.parse(io.out).hypothesis.logBF).toBe(Number(h.logBF.toPrecision(6)));
  });

  it('refuses a cell with no models, and cancels a queued comparison', async () => {
    const empty = (await w.editor.post(`${w.base}/cells`, { kind: 'compare', content: { modelCellIds: [] } })).body.cell;
    const bad = await w.editor.post(`${w.base}/cells/${empty.id}/compare-runs`, {});
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/at least one model/);
    const model = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: 'unknown a\nterm ld_normal(a, 0, 1)\n' })).body.cell;
    const cell = (await w.editor.post(`${w.base}/cells`, { kind: 'compare', content: { modelCellIds: [model.id] } })).body.cell;
    const q = await w.editor.post(`${w.base}/cells/${cell.id}/compare-runs`, {});
    expect(q.status).toBe(201);
    const c = await w.editor.post(`/api/workspaces/${w.ws}/compare-runs/${q.body.run.id}/cancel`, {});
    expect(c.status).toBe(200);
    expect(c.body.run.status).toBe('cancelled');
    expect((await w.editor.post(`/api/workspaces/${w.ws}/compare-runs/${q.body.run.id}/cancel`, {})).status).toBe(409);
  });
});
