/**
 * The mode finder against isotonic regression, and the chain contract: reproducibility, progress,
 * cancellation, errors, the automatic choice of sampler.
 */
import { describe, expect, it } from 'vitest';
import { dispersedStarts, prepareTarget } from '../../../server/engine/geometry';
import { sampleChain, shortlistEngines } from '../../../server/engine/samplers';
import { pilotPlan } from '../../../server/engine/samplers/auto';
import { bulkPoint, findMode } from '../../../server/engine/mode';
import normal from '@stdlib/stats-base-dists-normal';
import { Rng } from '../../../server/engine/rng';
import type { ModelTarget } from '../../../server/engine/types';
import { emptySystem, gaussianOnSimplexTarget, normalMeanTarget, orderedMeansTarget, system, truncatedNormalTarget, uniformSimplexTarget } from './targets';

/** Uniform on the unit box [0, 1]^d. */
function boxTarget(d: number): ModelTarget {
  const rows: { a: Record<number, number>; b: number }[] = [];
  for (let j = 0; j < d; j++) rows.push({ a: { [j]: -1 }, b: 0 }, { a: { [j]: 1 }, b: 1 });
  return { dim: d, names: Array.from({ length: d }, (_, j) => `x${j + 1}`), logDensity: (_t, g) => (g.fill(0), 0), inequalities: system(d, rows), equalities: emptySystem(d) };
}

/**
 * Pool-adjacent-violators for the least-squares fit under μ₁ ≤ … ≤ μₙ with equal weights
 * ("Statistical Inference under Order Restrictions", Wiley 1972;
 * written here from the textbook description).
 */
function pava(y: number[]): number[] {
  const blocks: { sum: number; count: number }[] = [];
  for (const v of y) {
    blocks.push({ sum: v, count: 1 });
    while (blocks.length > 1) {
      const b = blocks[blocks.length - 1];
      const a = blocks[blocks.length - 2];
      if (a.sum / a.count <= b.sum / b.count) break;
      blocks.splice(blocks.length - 2, 2, { sum: a.sum + b.sum, count: a.count + b.count });
    }
  }
  return blocks.flatMap((b) => Array(b.count).fill(b.sum / b.count));
}

describe('mode', () => {
  it.each([
    [[3.1, 2.4, 5.0, 4.2, 4.4, 6.3, 5.9, 7.7]],
    [[1, 2, 3, 4, 5]],
    [[5, 4, 3, 2, 1]],
    [[0.2, -1.3, 0.7, 0.1, 2.2, 1.9, 1.8, 3.0, 2.5, 4.1]],
  ])('flat prior + Gaussian noise + ordering equals isotonic regression by PAVA: %j', (y) => {
    const p = prepareTarget(orderedMeansTarget({ y, sigma: 0.7 }));
    const r = findMode(p);
    expect(r.converged).toBe(true);
    const iso = pava(y);
    for (let j = 0; j < y.length; j++) expect(Math.abs(r.theta[j] - iso[j])).toBeLessThan(1e-6);
  });

  it('PAVA itself on a hand-worked case: (3, 1, 2) pools to (2, 2, 2)', () => {
    expect(pava([3, 1, 2])).toEqual([2, 2, 2]);
  });

  it('without constraints the mode of the conjugate normal posterior is its mean (BDA3 eq. 2.12)', () => {
    const y = [4.1, 5.3, 3.8];
    const prec = 1 / 9 + 3 / 2.25;
    const mean = (y.reduce((s, v) => s + v, 0) / 2.25) / prec;
    const r = findMode(prepareTarget(normalMeanTarget({ y, sigma: 1.5, mu0: 0, tau0: 3 })));
    expect(r.converged).toBe(true);
    expect(r.theta[0]).toBeCloseTo(mean, 8);
  });
});

describe('chains', () => {
  const target = gaussianOnSimplexTarget({ d: 5, centre: 0.3, sd: 0.2 });
  const p = prepareTarget(target);
  const start = dispersedStarts(p, 1, new Rng(3))[0];

  it.each(['rhmc', 'hitrun'] as const)('%s: same seed and chain ⇒ identical draws; another chain ⇒ different draws', (sampler) => {
    const o = { warmup: 60, draws: 40, seed: 99, chain: 0 };
    const a = sampleChain(p, sampler, start, o);
    const b = sampleChain(p, sampler, start, o);
    expect(Array.from(a.draws)).toEqual(Array.from(b.draws));
    const c = sampleChain(p, sampler, start, { ...o, chain: 1 });
    expect(Array.from(a.draws)).not.toEqual(Array.from(c.draws));
  });

  it('reports progress about every 20 iterations and returns energies, acceptance and a factorisation count', () => {
    const seen: [string, number][] = [];
    const out = sampleChain(p, 'rhmc', start, { warmup: 40, draws: 40, seed: 1, chain: 0, onProgress: (ph, it) => seen.push([ph, it]) });
    expect(seen.length).toBeGreaterThanOrEqual(4);
    expect(seen.some(([ph]) => ph === 'warmup')).toBe(true);
    expect(seen.some(([ph]) => ph === 'sampling')).toBe(true);
    expect(out.energy!.length).toBe(40);
    expect(out.acceptStat.every((a) => a >= 0 && a <= 1)).toBe(true);
    expect(out.factorizationsPerStep).toBeGreaterThan(0);
    expect(out.stepSize).toBeGreaterThan(0);
  });

  it.each(['rhmc', 'hitrun'] as const)('%s: a cancelled chain throws an AbortError', (sampler) => {
    const ac = new AbortController();
    ac.abort();
    let err: unknown;
    try {
      sampleChain(p, sampler, start, { warmup: 10, draws: 10, seed: 1, chain: 0, signal: ac.signal });
    } catch (e) {
      err = e;
    }
    expect((err as Error).name).toBe('AbortError');
  });

  it('a log-density that is −∞ at the start is a clear error, not a hang', () => {
    const bad: ModelTarget = { ...target, logDensity: () => -Infinity };
    const pb = prepareTarget(bad);
    expect(() => sampleChain(pb, 'rhmc', pb.centre, { warmup: 10, draws: 10, seed: 1, chain: 0 })).toThrow(/log-density is -Infinity at the chain's starting point/);
  });
});

describe('automatic choice: the structural shortlist (the pilots are tested in auto-and-shapes.test.ts)', () => {
  it('flat density: a box → coordinate hit-and-run alone; standard shapes → transform-based HMC alone; a general polytope → pilots of rounded hit-and-run and reflective HMC', () => {
    const box = shortlistEngines(prepareTarget(boxTarget(3)));
    expect(box.candidates).toEqual(['coord-hitrun']);
    expect(box.why).toMatch(/box/);
    const simplex = shortlistEngines(prepareTarget(uniformSimplexTarget(4)));
    expect(simplex.candidates).toEqual(['transform-hmc']);
    expect(simplex.why).toMatch(/flat/);
    // x ≥ 0, y ≥ 0, x + 2y ≤ 1: not a simplex of the transforms (coefficient 2).
    const general: ModelTarget = {
      dim: 2,
      names: ['x', 'y'],
      logDensity: (_t, g) => (g.fill(0), 0),
      inequalities: system(2, [
        { a: { 0: -1 }, b: 0 },
        { a: { 1: -1 }, b: 0 },
        { a: { 0: 1, 1: 2 }, b: 1 },
      ]),
      equalities: emptySystem(2),
    };
    expect(shortlistEngines(prepareTarget(general)).candidates).toEqual(['hitrun', 'reflect-hmc']);
  });
  it('a varying density on a simplex → transform-based HMC by rule; no inequalities → plain HMC alone', () => {
    expect(shortlistEngines(prepareTarget(gaussianOnSimplexTarget({ d: 3, centre: 0.2, sd: 0.1 }))).candidates).toEqual(['transform-hmc']);
    const c = shortlistEngines(prepareTarget(normalMeanTarget({ y: [1], sigma: 1, mu0: 0, tau0: 1 })));
    expect(c.candidates).toEqual(['reflect-hmc']);
    expect(c.why).toMatch(/no inequality/);
  });
});

describe('bulk point (the first barrier stage of the mode search)', () => {
  it('standard normal truncated to x ≥ 1: the μ = 1 stage maximises −x²/2 + log(x − 1), at x = (1 + √5)/2, inside the bulk', () => {
    // Stationarity −x + 1/(x − 1) = 0 ⇔ x² − x − 1 = 0 (elementary calculus, derived here).
    const p = prepareTarget(truncatedNormalTarget({ lo: 1, hi: Infinity }));
    const z = bulkPoint(p, 50);
    expect(z[0]).toBeCloseTo((1 + Math.sqrt(5)) / 2, 6);
    // Between the 10% and 90% quantiles of N(0,1) truncated at 1: Φ⁻¹(Φ(1) + q(1 − Φ(1))) with
    // Φ(1) = 0.8413 (normal table, e.g. "Handbook of Mathematical Functions", 1964, table 26.1):
    // about 1.03 and 2.24 (@stdlib's normal distribution functions).
    const Phi1 = normal.cdf(1, 0, 1);
    const q = (u: number) => normal.quantile(Phi1 + u * (1 - Phi1), 0, 1);
    expect(z[0]).toBeGreaterThan(q(0.1));
    expect(z[0]).toBeLessThan(q(0.9));
    // The full mode search still ends on the face (the exact mode is x = 1).
    expect(findMode(p).theta[0]).toBeCloseTo(1, 6);
  });
});

describe('pilot plan', () => {
  it('equal shares of 8% of the fit at the cheapest rate; a candidate whose minimum pilot costs more than its share is not piloted', () => {
    // 4000 fit iterations at work 1 → 320 for two candidates → 160 each.
    expect(pilotPlan([1, 2], 4000)).toEqual([160, 80]);
    expect(pilotPlan([1, 10], 4000)).toEqual([160, 0]);
    expect(pilotPlan([1, Infinity], 40000)).toEqual([200, 0]); // capped at PILOT_MAX
  });
});

describe('improper targets', () => {
  it('a constant log-density on an unbounded region is refused with a clear message', () => {
    const p = prepareTarget(orderedMeansTarget({ y: [1, 2, 3], sigma: 1 }));
    const flat: ModelTarget = { ...p.target, logDensity: (_t, g) => (g.fill(0), 0) };
    const pf = prepareTarget(flat);
    expect(() => shortlistEngines(pf)).toThrow(/improper/);
    for (const s of ['rhmc', 'hitrun'] as const) {
      expect(() => sampleChain(pf, s, pf.centre, { warmup: 10, draws: 10, seed: 1, chain: 0 })).toThrow(/improper/);
    }
  });
});
