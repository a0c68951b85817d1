/**
 * The stored form of a run's model checks (engine/predictive/summary.ts, runs/checks.ts,
 * shared/checks.ts):
 *  - the replicated 5% / 95% interval of a statistic against jStat's inclusive percentile (npm
 *    `jstat`, linear interpolation at h = (n − 1)p) of the statistic over the replicates;
 *  - the overlay's bins: one per whole number for counts; otherwise Rice's rule ⌈2·n^(1/3)⌉ bins
 *    (a common-practice histogram rule), shares of each bin counted by hand here;
 *  - leave-one-out rows with Pareto k above 0.7 named worst first (the threshold of "Pareto
 *    smoothed importance sampling", JMLR 2024), non-finite numbers stored as null;
 *  - the draws the checks read thinned to at most CHECK_MAX_DRAWS; too large data skipped with a reason;
 *  - the user statistic's short list: every name the pattern accepts is one the engine computes.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { CHECK_STAT_PATTERN, LOO_LISTED_ROWS, checkStatSchema, isExtremeP, runChecksSchema } from '../../../shared/checks';
import { fitSettingsSchema } from '../../../shared/fit';
import { checkStatistic, statistic } from '../../../server/engine/predictive/ppc';
import { overlayEdges, overlayOf, summariseChecks } from '../../../server/engine/predictive/summary';
import type { ModelChecks } from '../../../server/engine/predictive/checks';
import { CHECK_MAX_DRAWS, CHECK_MAX_REPLICATED, checkStatistics, checksInput } from '../../../server/runs/checks';
import { Rng } from '../../../server/engine/rng';
import type { DataTables } from '../../../server/engine/types';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
const jStat = (createRequire(import.meta.url)('jstat') as { jStat: Record<string, (...a: any[]) => number> }).jStat;

function normals(seed: number, n: number, mu = 0, sd = 1): Float64Array {
  const rng = new Rng(seed, 1);
  return Float64Array.from({ length: n }, () => mu + sd * rng.normal());
}

describe('statistics', () => {
  it('the replicated interval is the 5% and 95% percentile of the statistic over the replicates', () => {
    const y = normals(1, 30);
    const reps = Array.from({ length: 101 }, (_, k) => normals(100 + k, 30, 0.2, 1.3));
    const c = checkStatistic(statistic('sd'), y, reps);
    const values = reps.map((r) => jStat.stdev(Array.from(r), true));
    expect(c.replicatedQ05).toBeCloseTo(jStat.percentile(values, 0.05), 12);
    expect(c.replicatedQ95).toBeCloseTo(jStat.percentile(values, 0.95), 12);
    expect(c.observed).toBeCloseTo(jStat.stdev(Array.from(y), true), 12);
  });

  it('extreme p-values: below 0.05 or above 0.95', () => {
    expect([0.01, 0.049, 0.05, 0.5, 0.95, 0.951].map(isExtremeP)).toEqual([true, true, false, false, false, true]);
  });
});

describe('overlay', () => {
  it('counts get one bin per whole number; the observed shares are the plain counts', () => {
    const y = Float64Array.of(0, 1, 1, 2, 2, 2, 5);
    const reps = [Float64Array.of(0, 0, 1, 1, 2, 3, 4), Float64Array.of(1, 1, 1, 2, 2, 3, 6)];
    const edges = overlayEdges(y, reps)!;
    expect(edges).toEqual([-0.5, 0.5, 1.5, 2.5, 3.5, 4.5, 5.5, 6.5]);
    const o = overlayOf(y, reps)!;
    expect(o.observed.map((s) => s * 7)).toEqual([1, 2, 3, 0, 0, 1, 0].map((c) => expect.closeTo(c, 3)));
    expect(o.sample).toHaveLength(2);
    expect(o.clipped).toBe(0);
  });

  it("continuous values get Rice's number of bins; shares are bounded by the replicates' quantiles when the data come from the model", () => {
    const n = 200;
    const y = normals(7, n, 10, 2);
    const reps = Array.from({ length: 200 }, (_, k) => normals(1000 + k, n, 10, 2));
    const o = overlayOf(y, reps)!;
    expect(o.edges.length - 1).toBe(Math.ceil(2 * Math.cbrt(n)));
    // The observed shares, counted by hand over the same edges, add to one.
    const width = (o.edges[o.edges.length - 1] - o.edges[0]) / (o.edges.length - 1);
    const counts = new Array(o.edges.length - 1).fill(0);
    for (const v of y) counts[Math.min(counts.length - 1, Math.floor((v - o.edges[0]) / width))]++;
    o.observed.forEach((s, b) => expect(s).toBeCloseTo(counts[b] / n, 3));
    for (let b = 0; b < o.q05.length; b++) {
      expect(o.q05[b]).toBeLessThanOrEqual(o.q25[b]);
      expect(o.q25[b]).toBeLessThanOrEqual(o.q50[b]);
      expect(o.q50[b]).toBeLessThanOrEqual(o.q75[b]);
      expect(o.q75[b]).toBeLessThanOrEqual(o.q95[b]);
    }
    expect(o.sample).toHaveLength(20);
  });

  it('identical replicates give a band of width zero on the observed shares', () => {
    const y = normals(3, 50);
    const o = overlayOf(y, [y, y, y])!;
    expect(o.q05).toEqual(o.observed);
    expect(o.q95).toEqual(o.observed);
  });
});

describe('summariseChecks', () => {
  const spec = { name: 'y_new', line: 4, density: 'ld_normal', length: 3, observed: Float64Array.of(1, 2, 3), table: 'd', groups: [] };
  const base = (kind: 'posterior' | 'prior'): ModelChecks => ({
    kind,
    replicated: [{ spec, draws: [0, 1], values: [Float64Array.of(1, 2, 4), Float64Array.of(0, 2, 3)] }],
    predictive: [
      { name: 'y_new', replicates: 2, checks: [{ stat: 'mean', observed: 2, replicatedMean: 2, replicatedSd: 0.5, replicatedQ05: NaN, replicatedQ95: Infinity, p: 0.5 }], groups: [] },
    ],
  });

  it('names the rows with high Pareto k worst first, caps the list, and stores non-finite numbers as null', () => {
    const rows = Array.from({ length: 80 }, (_, i) => ({ table: 'd', row: i + 1, elpd: -1, pLoo: 0.1, k: i < 60 ? 0.71 + i / 100 : 0.2 }));
    rows[5].k = Infinity;
    const c = base('posterior');
    c.loo = { elpd: -80, se: 2, mcse: 0.1, pLoo: 8, lpd: -72, kThreshold: 0.7, draws: 400, highK: rows.filter((r) => r.k > 0.7).map((r) => ({ table: r.table, row: r.row, k: r.k })), rows };
    const s = summariseChecks(c, ['mean'], { draws: 400, thin: 1 });
    expect(runChecksSchema.parse(JSON.parse(JSON.stringify(s)))).toBeTruthy();
    expect(s.items[0].stats[0]).toEqual({ stat: 'mean', observed: 2, mean: 2, lo: null, hi: null, p: 0.5 });
    expect(s.loo!.highKCount).toBe(60);
    expect(s.loo!.highK).toHaveLength(LOO_LISTED_ROWS);
    expect(s.loo!.highK[0]).toEqual({ table: 'd', row: 6, k: null });
    expect(s.loo!.highK[1].row).toBe(60);
    expect(s.loo!.kMax).toBeNull();
    expect(s.loo!.k).toHaveLength(80);
  });

  it('a prior run says why it has no leave-one-out; a model without replicate lines says why it has no checks', () => {
    const p = summariseChecks(base('prior'), ['mean'], { draws: 2, thin: 1 });
    expect(p.kind).toBe('prior');
    expect(p.loo).toBeUndefined();
    expect(p.looUnavailable).toMatch(/prior-only/);
    const none = summariseChecks({ kind: 'posterior', replicated: [], predictive: [], looUnavailable: 'no likelihood' }, ['mean'], { draws: 2, thin: 1 });
    expect(none.skipped).toMatch(/no replicate line/);
    expect(none.looUnavailable).toBe('no likelihood');
  });
});

describe('the run side', () => {
  const tables = (rows: number): DataTables => ({ d: { rows, columns: { y: { type: 'numeric', values: new Float64Array(rows) } } } });
  const settings = fitSettingsSchema.parse({ chains: 2, draws: 5000, warmup: 100, seed: 3 });

  it(`reads every t-th draw so at most ${CHECK_MAX_DRAWS} are used`, () => {
    const dim = 2;
    const chains = [0, 1].map((c) => ({ draws: Float64Array.from({ length: 5000 * dim }, (_, i) => c * 1e6 + i) }));
    const r = checksInput('src', tables(10), { unknownNames: ['a', 'b'], chains }, settings);
    if (!r.ok) throw new Error(r.reason);
    expect(r.input.thin).toBe(Math.ceil(10_000 / CHECK_MAX_DRAWS));
    expect(r.input.draws).toBeLessThanOrEqual(CHECK_MAX_DRAWS);
    // Draw j of a chain is its draw j·thin, both coordinates.
    expect(Array.from(r.input.chains[1].draws.subarray(2, 4))).toEqual([1e6 + 3 * dim, 1e6 + 3 * dim + 1]);
  });

  it('skips with a reason when the replicated data would be too large', () => {
    const rows = Math.ceil(CHECK_MAX_REPLICATED / 200) + 1;
    const r = checksInput('src', tables(rows), { unknownNames: ['a'], chains: [{ draws: new Float64Array(10) }] }, settings);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/fewer replicated data sets/);
  });

  it("adds the user's statistic once, after the built-in ones", () => {
    expect(checkStatistics({ checkStat: 'iqr' })).toEqual(['mean', 'sd', 'min', 'max', 'zeros', 'iqr']);
    expect(checkStatistics({})).toEqual(['mean', 'sd', 'min', 'max', 'zeros']);
  });
});

describe('the user statistic', () => {
  it('accepts the short list, each computed by the engine, and refuses anything else', () => {
    for (const ok of ['median', 'iqr', 'q0.9', 'q.25', 'q0.05', 'above:10', 'below:-2.5']) {
      expect(CHECK_STAT_PATTERN.test(ok)).toBe(true);
      expect(() => statistic(ok)).not.toThrow();
    }
    for (const bad of ['q0', 'q0.0', 'q1', 'q1.5', 'mean(x)', 'above:', 'above:1e400x', 'sum', 'x; y']) expect(checkStatSchema.safeParse(bad).success).toBe(false);
  });

  it('settings without the new fields still parse (older notebooks and runs)', () => {
    expect(fitSettingsSchema.parse({ chains: 2, warmup: 100, draws: 100, seed: 1, sampler: 'auto' })).toEqual({ chains: 2, warmup: 100, draws: 100, seed: 1, sampler: 'auto' });
  });
});

describe('the notebook file carries the check settings', () => {
  const file = (settings: Record<string, unknown>) => ({
    slackline_notebook: 2,
    title: 'Storms',
    blocks: [
      { ref: 'b1', role: 'model', folded: false, text: 'unknown a\nterm ld_normal(a, 0, 1)' },
      { ref: 'b2', role: 'fit', folded: false, text: '', model_ref: 'b1', settings },
    ],
    tables: [],
  });
  const base = { chains: 2, warmup: 100, draws: 100, seed: 1, sampler: 'auto' };

  it('reads prior-only, the replicate count and the statistic, and still reads files without them', async () => {
    const { buildNotebookFile, readNotebookFile } = await import('../../../shared/notebook-file');
    const withChecks = { ...base, priorOnly: true, replicates: 300, checkStat: 'q0.9' };
    const r = readNotebookFile(file(withChecks));
    expect(r.ok && r.file.cells[1].content).toEqual({ modelCellId: 'b1', settings: withChecks });
    const old = readNotebookFile(file(base));
    expect(old.ok && old.file.cells[1].content).toEqual({ modelCellId: 'b1', settings: base });
    const bad = readNotebookFile(file({ ...base, checkStat: 'x = 1' }));
    expect(bad.ok).toBe(false);
    // Export writes them back as they are stored.
    const out = buildNotebookFile('Storms', [{ id: 'm', kind: 'model', source: 'unknown a', collapsed: false, content: null }, { id: 'f', kind: 'fit', source: '', collapsed: false, content: { modelCellId: 'm', settings: withChecks } }], [], new Date(0));
    expect(out.blocks[1]).toMatchObject({ role: 'fit', settings: withChecks });
  });
});
