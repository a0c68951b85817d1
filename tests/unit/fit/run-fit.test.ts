import { afterAll, describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import cdf from '@stdlib/stats-base-dists-normal-cdf';
import pdf from '@stdlib/stats-base-dists-normal-pdf';
import { closeFitWorkers, runFit } from '../../../server/engine/fit';
import { fitSummarySchema, type FitProgress } from '../../../shared/fit';
import type { TargetSpec } from '../../../server/engine/types';

const FIXTURES = fileURLToPath(new URL('./fixtures.ts', import.meta.url));
const pair: TargetSpec = { kind: 'module', modulePath: FIXTURES, exportName: 'orderedPair', args: null };
const trunc: TargetSpec = { kind: 'module', modulePath: FIXTURES, exportName: 'truncatedNormal', args: { lo: -1, hi: 2 } };

const q = (r: Awaited<ReturnType<typeof runFit>>, name: string) => r.summary.quantities.find((x) => x.name === name)!;

describe('runFit', () => {
  afterAll(() => closeFitWorkers());

  it('gives identical draws in-process and on worker threads for the same seed', async () => {
    const settings = { chains: 3, warmup: 100, draws: 150, seed: 4242, sampler: 'rhmc' as const };
    const a = await runFit(trunc, settings, { parallel: false });
    // Two workers for three chains: one worker runs two chains in turn.
    const b = await runFit(trunc, settings, { parallel: true, maxWorkers: 2 });
    expect(b.chains.map((c) => c.chain)).toEqual([0, 1, 2]);
    for (let c = 0; c < 3; c++) {
      expect(Array.from(b.chains[c].draws)).toEqual(Array.from(a.chains[c].draws));
      expect(Array.from(b.chains[c].derivedDraws)).toEqual(Array.from(a.chains[c].derivedDraws));
      expect(Array.from(b.chains[c].energy!)).toEqual(Array.from(a.chains[c].energy!));
      // Per-draw flags cross the thread boundary too.
      expect(Array.from(b.chains[c].divergent)).toEqual(Array.from(a.chains[c].divergent));
      expect(b.chains[c].rejected).toHaveLength(150);
      expect(Array.from(b.chains[c].rejected!)).toEqual(Array.from(a.chains[c].rejected!));
    }
    expect(b.summary.quantities).toEqual(a.summary.quantities);
    expect(b.summary.diagnostics.rejectedSteps).toBe(a.summary.diagnostics.rejectedSteps);
    // Another seed gives other draws.
    const c = await runFit(trunc, { ...settings, seed: 4243 }, { parallel: false });
    expect(Array.from(c.chains[0].draws)).not.toEqual(Array.from(a.chains[0].draws));
  }, 60_000);

  it('computes the same summary on a worker thread as on the calling thread', async () => {
    const settings = { chains: 2, warmup: 100, draws: 150, seed: 777, sampler: 'rhmc' as const };
    const inline = await runFit(trunc, settings, { parallel: true });
    const off = await runFit(trunc, settings, { parallel: true, summaryOnWorker: true, resume: inline.chains });
    expect(off.summary.quantities).toEqual(inline.summary.quantities);
    expect(off.summary.diagnostics).toEqual(inline.summary.diagnostics);
    expect(off.summary.verdict).toEqual(inline.summary.verdict);
  }, 60_000);

  it('summarises unknowns then derived quantities, matching the order-statistic means', async () => {
    const r = await runFit(pair, { chains: 4, warmup: 100, draws: 500, seed: 7 }, { parallel: false });
    expect(fitSummarySchema.parse(r.summary)).toBeTruthy();
    expect(r.summary.quantities.map((x) => [x.name, x.kind])).toEqual([
      ['x[1]', 'unknown'],
      ['x[2]', 'unknown'],
      ['gap', 'derived'],
    ]);
    expect(r.unknownNames).toEqual(['x[1]', 'x[2]']);
    expect(r.derivedNames).toEqual(['gap']);
    // Uniform on {0 ≤ x₁ ≤ x₂ ≤ 1} is the law of the order statistics of two U(0,1): x₁ ~ Beta(1,2)
    // (mean 1/3), x₂ ~ Beta(2,1) (mean 2/3), and the spacing x₂ − x₁ ~ Beta(1,2) (
    // "Order Statistics" (3rd ed., Wiley 2003), §2.5 — uniform spacings are exchangeable). Tolerance 4·MCSE of the run.
    for (const [name, truth] of [['x[1]', 1 / 3], ['x[2]', 2 / 3], ['gap', 1 / 3]] as const) {
      const s = q(r, name);
      expect(Math.abs(s.mean - truth)).toBeLessThan(4 * s.mcseMean);
    }
    // A flat density on a bounded region: the automatic choice is one of its structural shortlist
    // (docs/engine.md §7.2), with its reason.
    expect(['transform-hmc', 'reflect-hmc', 'hitrun', 'coord-hitrun']).toContain(r.summary.diagnostics.samplerUsed);
    expect(r.summary.diagnostics.samplerReason).toMatch(/flat/);
    expect(r.summary.verdict.rules.length).toBeGreaterThan(0);
    // gap is computed per draw from the draws themselves.
    const ch = r.chains[2];
    for (let i = 0; i < 10; i++) expect(ch.derivedDraws[i]).toBeCloseTo(ch.draws[2 * i + 1] - ch.draws[2 * i], 14);
  }, 60_000);

  it("uses the sampler tests' equality-simplex target: Beta(1, k−1) means, sum kept at 1", async () => {
    // Uniform on {w ≥ 0, Σw = 1} with k = 4 is Dirichlet(1,1,1,1); each w_j ~ Beta(1, 3), mean 1/4
    // (Dirichlet aggregation property;
    // "Continuous Multivariate Distributions", vol. 1 (2nd ed., Wiley 2000), ch. 49). Tolerance 4·MCSE of the run. runFit itself checks every draw
    // against Σw = 1 and w ≥ 0 before summarising.
    const spec: TargetSpec = {
      kind: 'module',
      modulePath: fileURLToPath(new URL('../samplers/targets.ts', import.meta.url)),
      exportName: 'equalitySimplexTarget',
      args: 4,
    };
    const r = await runFit(spec, { chains: 2, warmup: 100, draws: 400, seed: 12 });
    expect(r.unknownNames).toEqual(['w[1]', 'w[2]', 'w[3]', 'w[4]']);
    for (const s of r.summary.quantities) expect(Math.abs(s.mean - 0.25)).toBeLessThan(4 * s.mcseMean);
    for (const c of r.chains) {
      for (let i = 0; i < 400; i++) {
        const sum = c.draws[4 * i] + c.draws[4 * i + 1] + c.draws[4 * i + 2] + c.draws[4 * i + 3];
        expect(Math.abs(sum - 1)).toBeLessThan(1e-9);
      }
    }
  }, 60_000);

  it('truncated normal: mean and E[z²] match the closed form', async () => {
    // Standard normal truncated to [a, b]: E z = (φ(a) − φ(b))/Z, E z² = 1 + (aφ(a) − bφ(b))/Z,
    // Z = Φ(b) − Φ(a) (
    // "Continuous Univariate Distributions", vol. 1 (2nd ed., Wiley 1994), ch. 13). Φ and φ from @stdlib. Tolerance 4·MCSE of the run.
    const r = await runFit(trunc, { chains: 2, warmup: 200, draws: 400, seed: 99, sampler: 'rhmc' }, { parallel: false });
    const a = -1;
    const b = 2;
    const Z = cdf(b, 0, 1) - cdf(a, 0, 1);
    const mean = (pdf(a, 0, 1) - pdf(b, 0, 1)) / Z;
    const second = 1 + (a * pdf(a, 0, 1) - b * pdf(b, 0, 1)) / Z;
    expect(Math.abs(q(r, 'z').mean - mean)).toBeLessThan(4 * q(r, 'z').mcseMean);
    expect(Math.abs(q(r, 'z_squared').mean - second)).toBeLessThan(4 * q(r, 'z_squared').mcseMean);
    expect(r.summary.diagnostics.samplerUsed).toBe('rhmc');
    expect(r.summary.diagnostics.efmi).toHaveLength(2);
    expect(r.summary.diagnostics.samplerReason).toMatch(/fit settings/);
  }, 60_000);

  it('streams progress per chain up to the total', async () => {
    for (const parallel of [false, true]) {
      const seen: FitProgress[] = [];
      await runFit(pair, { chains: 2, warmup: 60, draws: 80, seed: 1 }, { parallel, onProgress: (p) => seen.push(p) });
      for (const chain of [0, 1]) {
        const mine = seen.filter((p) => p.chain === chain);
        expect(mine.length).toBeGreaterThan(3);
        const its = mine.map((p) => p.iteration);
        expect([...its].sort((x, y) => x - y)).toEqual(its); // non-decreasing
        expect(mine.at(-1)).toMatchObject({ phase: 'done', iteration: 140, total: 140 });
        expect(mine.some((p) => p.phase === 'warmup')).toBe(true);
        expect(mine.some((p) => p.phase === 'sampling')).toBe(true);
      }
    }
  }, 60_000);

  it('hands over each finished chain and resumes from kept chains with the same result', async () => {
    const settings = { chains: 3, warmup: 60, draws: 80, seed: 31, sampler: 'rhmc' as const };
    const handed: number[] = [];
    const full = await runFit(trunc, settings, { parallel: false, onChainDone: (c) => handed.push(c.chain) });
    expect(handed).toEqual([0, 1, 2]);
    // An interrupted attempt kept chain 2 only: the resumed fit runs chains 0 and 1 (on workers).
    const resumedHanded: number[] = [];
    const resumed = await runFit(trunc, settings, { resume: [full.chains[2]], onChainDone: (c) => resumedHanded.push(c.chain) });
    expect(resumedHanded.sort()).toEqual([0, 1]);
    expect(resumed.summary.quantities).toEqual(full.summary.quantities);
    // The summary counts flags over every chain's kept draws; a kept chain without `rejected`
    // (stored before it existed) reads as zeros.
    const flagged = (c: { rejected?: Uint8Array }) => (c.rejected ? c.rejected.reduce((s, x) => s + x, 0) : 0);
    expect(full.summary.diagnostics.rejectedSteps).toBe(full.chains.reduce((s, c) => s + flagged(c), 0));
    const { rejected: _dropped, ...older } = full.chains[2];
    const fromOlder = await runFit(trunc, settings, { parallel: false, resume: [older] });
    expect(fromOlder.summary.diagnostics.rejectedSteps).toBe(flagged(full.chains[0]) + flagged(full.chains[1]));
    expect(fromOlder.summary.quantities).toEqual(full.summary.quantities);
    await expect(runFit(trunc, { ...settings, draws: 90 }, { parallel: false, resume: [full.chains[0]] })).rejects.toThrow(
      /does not match/,
    );
  }, 60_000);

  it('cancels in-process from a progress callback', async () => {
    const ac = new AbortController();
    const run = runFit(trunc, { chains: 2, warmup: 500, draws: 500, seed: 2, sampler: 'rhmc' }, {
      parallel: false,
      signal: ac.signal,
      onProgress: (p) => {
        if (p.iteration > 40) ac.abort();
      },
    });
    await expect(run).rejects.toMatchObject({ name: 'AbortError' });
  });

  it('cancels worker-thread chains', async () => {
    const ac = new AbortController();
    const t0 = performance.now();
    const run = runFit(trunc, { chains: 2, warmup: 20_000, draws: 20_000, seed: 2, sampler: 'rhmc' }, {
      signal: ac.signal,
      onProgress: (p) => {
        if (p.iteration > 100) ac.abort();
      },
    });
    await expect(run).rejects.toMatchObject({ name: 'AbortError' });
    // Terminated, not run to the end (40 000 iterations per chain would take far longer).
    expect(performance.now() - t0).toBeLessThan(30_000);
  }, 60_000);

  it('reports a missing factory clearly, from workers too', async () => {
    const bad: TargetSpec = { kind: 'module', modulePath: FIXTURES, exportName: 'nothing', args: null };
    await expect(runFit(bad, { chains: 1 }, { parallel: false })).rejects.toThrow(/no exported function "nothing"/);
  });

  it('stops the other chains and reports the first error from a worker', async () => {
    // The main thread builds the target first, so a broken spec fails before any worker starts;
    // here the factory fails only inside worker threads (it checks where it runs).
    const spec: TargetSpec = { kind: 'module', modulePath: FIXTURES, exportName: 'failsInWorker', args: null };
    await expect(runFit(spec, { chains: 3, warmup: 50, draws: 50 }, { parallel: true })).rejects.toThrow(
      /built in a worker thread on purpose/,
    );
  }, 60_000);

  it('reuses worker threads across fits', async () => {
    const settings = { chains: 2, warmup: 50, draws: 50, seed: 3 };
    await runFit(pair, settings);
    const t0 = performance.now();
    const r = await runFit(pair, settings);
    expect(r.chains).toHaveLength(2);
    // Not a speed assertion: the second fit must simply complete on the kept workers.
    expect(performance.now() - t0).toBeGreaterThan(0);
    await closeFitWorkers();
    // A fit after closing starts fresh workers.
    expect((await runFit(pair, settings)).chains).toHaveLength(2);
  }, 60_000);

  it('rejects settings outside the limits', async () => {
    await expect(runFit(pair, { chains: 0 }, { parallel: false })).rejects.toThrow();
  });
});
