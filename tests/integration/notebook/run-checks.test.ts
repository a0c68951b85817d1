/**
 * Model checks of a run through the API and a real worker: a fit whose model has a replicate line
 * stores its predictive checks (statistics with p-values, per group, a binned overlay) and its
 * leave-one-out summary with the run's summary; a prior-only run drops the likelihood, is labelled
 * as such and stores prior predictive checks; a malformed user statistic is refused.
 *
 * The model is Poisson counts with a gamma prior, conjugate, so the answers have closed forms:
 * the posterior of the rate is Gamma(2 + Σy, 0.5 + n) (shape, rate; "Bayesian Data Analysis",
 * 3rd ed., section 2.6), the sum of n replicated counts is negative binomial with r = 2 + Σy and
 * success probability (0.5 + n)/(0.5 + 2n), and a left-out count given the others is negative
 * binomial with r = 2 + Σy − y_i and probability (0.5 + n − 1)/(0.5 + n). The bounds 1 ≤ rate ≤ 20
 * leave out less than 1e−6 of that posterior, so the closed forms apply. Probabilities from jStat
 * (npm `jstat`: negbin.pdf, gamma.cdf).
 */
import { createRequire } from 'node:module';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunWorker } from '../../../server/runs/worker';
import { computeRunChecks } from '../../../server/runs/checks';
import { parseCsv } from '../../../shared/data';
import { fitSettingsSchema } from '../../../shared/fit';
import { notebookWorld, postFile, type NotebookWorld } from './setup';

type F = (...a: number[]) => number;
const jStat = (createRequire(import.meta.url)('jstat') as { jStat: Record<string, Record<string, F>> }).jStat;

let w: NotebookWorld;
beforeAll(async () => {
  w = await notebookWorld();
});
afterAll(() => w.server.close());

// Invented: cups of coffee brewed per morning at two tasting bars (our own made-up data).
const CUPS = [3, 5, 4, 6, 2, 5, 4, 7, 3, 4];
const BARS = ['north', 'south', 'north', 'south', 'north', 'south', 'north', 'south', 'north', 'south'];
const CSV = 'cups,bar\n' + CUPS.map((c, i) => `${c},${BARS[i]}`).join('\n') + '\n';
const MODEL = '# Brew rate\ntable tasting\nunknown rate\nterm ld_poisson(cups, rate)\nterm ld_gamma(rate, 2, 0.5)\nconstrain rate >= 1\nconstrain rate <= 20\nreplicate cups_new = ld_poisson(cups, rate)\n';
const settings = { chains: 2, warmup: 200, draws: 300, seed: 77, sampler: 'auto' as const, replicates: 200, checkStat: 'q0.9' };

/** P(X > k) + ½ P(X = k) for a negative binomial (failures before r successes, success probability p). */
function nbUpperMid(k: number, r: number, p: number): number {
  let below = 0;
  for (let j = 0; j < k; j++) below += jStat.negbin.pdf(j, r, p);
  const at = jStat.negbin.pdf(k, r, p);
  return 1 - below - at + 0.5 * at;
}

let fitCellId = '';
async function setUp(): Promise<void> {
  if (fitCellId) return;
  const up = await postFile(w.editor, `/api/workspaces/${w.ws}/datasets`, { name: 'cups.csv', text: CSV }, { name: 'tasting' });
  expect(up.status).toBe(201);
  await w.editor.post(`${w.base}/cells`, { kind: 'data', content: { datasetId: up.body.dataset.id } });
  const model = (await w.editor.post(`${w.base}/cells`, { kind: 'model', source: MODEL })).body.cell;
  fitCellId = (await w.editor.post(`${w.base}/cells`, { kind: 'fit', content: { modelCellId: model.id, settings } })).body.cell.id;
}

async function runOne(body: object) {
  const created = await w.editor.post(`${w.base}/cells/${fitCellId}/runs`, body);
  expect(created.status).toBe(201);
  const worker = new RunWorker({ db: w.server.db.db, parallel: false, progressMs: 0, heartbeatMs: 1000, log: () => {} });
  // One unit per chain, taken one at a time; the slot that stores the last chain finishes the fit (and its checks).
  let units = 0;
  while (await worker.runOnce()) units++;
  expect(units).toBeGreaterThan(0);
  const got = await w.viewer.get(`/api/workspaces/${w.ws}/runs/${created.body.run.id}`);
  expect(got.status).toBe(200);
  expect(got.body.run.status).toBe('done');
  return got.body.run;
}

describe('model checks stored with a run', () => {
  it('a fit with a replicate line stores statistics with p-values, groups, an overlay and leave-one-out', async () => {
    await setUp();
    const run = await runOne({});
    const c = run.summary.checks;
    expect(c.kind).toBe('posterior');
    expect(c.replicates).toBe(200);
    expect(c.statistics).toEqual(['mean', 'sd', 'min', 'max', 'zeros', 'q0.9']);
    expect(c.items).toHaveLength(1);
    const item = c.items[0];
    expect(item).toMatchObject({ name: 'cups_new', density: 'ld_poisson', rows: CUPS.length, table: 'tasting' });
    const mean = item.stats.find((s: { stat: string }) => s.stat === 'mean');
    // Observed mean: plain arithmetic.
    expect(mean.observed).toBeCloseTo(CUPS.reduce((a, b) => a + b, 0) / CUPS.length, 12);
    // The p-value of the mean against the negative binomial of the replicated sum. Tolerance: four
    // binomial standard errors of a proportion over the 200 replicates (replicates drawn from
    // draws spread over both chains, treated as independent).
    const n = CUPS.length;
    const sum = CUPS.reduce((a, b) => a + b, 0);
    const exactP = nbUpperMid(sum, 2 + sum, (0.5 + n) / (0.5 + 2 * n));
    expect(Math.abs(mean.p - exactP)).toBeLessThan(4 * Math.sqrt((exactP * (1 - exactP)) / 200));
    expect(mean.lo).toBeLessThan(mean.hi);
    // Every statistic has a p-value in [0, 1]; the whole-number counts have no zeros anywhere.
    for (const s of item.stats) expect(s.p).toBeGreaterThanOrEqual(0);
    for (const s of item.stats) expect(s.p).toBeLessThanOrEqual(1);
    expect(item.stats.find((s: { stat: string }) => s.stat === 'zeros').observed).toBe(0);
    // Per group: the category column's two levels with five rows each.
    expect(item.groups.map((g: { column: string; level: string; rows: number }) => [g.column, g.level, g.rows])).toEqual([
      ['bar', 'north', 5],
      ['bar', 'south', 5],
    ]);
    // Overlay: whole-number bins, observed shares add up to one.
    const ov = item.overlay;
    expect(ov.edges[1] - ov.edges[0]).toBe(1);
    expect(ov.observed.reduce((a: number, b: number) => a + b, 0)).toBeCloseTo(1, 3);
    expect(ov.sample).toHaveLength(20);
    // Leave-one-out: every row has its Pareto k; elpd against the exact leave-one-out predictive.
    const loo = c.loo;
    expect(loo.rows).toBe(n);
    expect(loo.k).toHaveLength(n);
    expect(loo.highKCount).toBe(loo.highK.length);
    let exactElpd = 0;
    for (const y of CUPS) exactElpd += Math.log(jStat.negbin.pdf(y, 2 + sum - y, (0.5 + n - 1) / (0.5 + n)));
    // Tolerance: four of the estimate's own Monte Carlo standard errors.
    expect(Math.abs(loo.elpd - exactElpd)).toBeLessThan(4 * loo.mcse);
  });

  it('a prior-only run drops the likelihood, is labelled, and stores prior predictive checks without leave-one-out', async () => {
    await setUp();
    const run = await runOne({ settings: { ...settings, priorOnly: true, seed: 78 } });
    expect(run.settings.priorOnly).toBe(true);
    expect(run.summary.settings.priorOnly).toBe(true);
    // Without the counts the rate follows its prior Gamma(2, 0.5) cut to [1, 20]: its mean is
    // 2·2·[G₃(20) − G₃(1)]/[G₂(20) − G₂(1)] with G_a the gamma cdf of shape a and scale 2
    // (truncated gamma mean, handbook identity x·g_a(x) = a·θ·g_{a+1}(x)). Tolerance 4 MCSE.
    const G = (a: number, x: number) => jStat.gamma.cdf(x, a, 2);
    const priorMean = (2 * 2 * (G(3, 20) - G(3, 1))) / (G(2, 20) - G(2, 1));
    const rate = run.summary.quantities[0];
    expect(Math.abs(rate.mean - priorMean)).toBeLessThan(4 * rate.mcseMean);
    const c = run.summary.checks;
    expect(c.kind).toBe('prior');
    expect(c.loo).toBeUndefined();
    expect(c.looUnavailable).toMatch(/prior-only/);
    expect(c.items[0].stats.length).toBe(6);
    // The runs list carries the label too.
    const list = await w.viewer.get(`${w.base}/cells/${fitCellId}/runs`);
    expect(list.body.runs.find((r: { id: string }) => r.id === run.id).settings.priorOnly).toBe(true);
  });

  it('refuses a user statistic outside the short list', async () => {
    await setUp();
    for (const bad of ['mean(x)', 'q1.5', 'q0', 'eval:1', 'above:']) {
      const res = await w.editor.post(`${w.base}/cells/${fitCellId}/runs`, { settings: { ...settings, checkStat: bad } });
      expect(res.status).toBe(400);
    }
  });

  it('checks past their time limit are stopped on the compute pool and say why instead of throwing', async () => {
    const tables = { tasting: parseCsv(CSV).table! };
    const fit = { unknownNames: ['rate'], chains: [{ draws: Float64Array.from({ length: 400 }, (_, i) => 3 + (i % 7) / 7) }] };
    const s = fitSettingsSchema.parse(settings);
    const stopped = await computeRunChecks(MODEL, tables, fit, s, { timeoutMs: 1 });
    expect(stopped.items).toEqual([]);
    expect(stopped.skipped).toMatch(/took longer than 0.001 s and were stopped/);
    // The same checks with the ordinary limit compute.
    const done = await computeRunChecks(MODEL, tables, fit, s);
    expect(done.skipped).toBeUndefined();
    expect(done.items[0].stats).toHaveLength(6);
    expect(done.draws).toBe(400);
  });
});
