/**
 * The implicit-midpoint RHMC (server/engine/samplers/rhmc-midpoint.ts): the log-det gradient against
 * finite differences, exact reversibility of one step, and moments on every factorisation path of
 * the metric (linalg/metric.ts) against closed forms.
 */
import { describe, expect, it } from 'vitest';
import normal from '@stdlib/stats-base-dists-normal';
import { dispersedStarts, prepareTarget } from '../../../server/engine/geometry';
import { MidpointIntegrator } from '../../../server/engine/samplers/rhmc-midpoint';
import { rhmcChain } from '../../../server/engine/samplers/rhmc';
import { makeDrawCheck } from '../../../server/engine/samplers';
import { Rng } from '../../../server/engine/rng';
import type { ModelTarget } from '../../../server/engine/types';
import { betaMoments, expectAllFeasible, expectMean, expectVariance, runChains } from './helpers';
import {
  bivariateNormalTarget,
  equalitySimplexTarget,
  gaussianOnSimplexTarget,
  orderSimplexTarget,
  truncatedNormalBoxTarget,
  twoBudgetsTarget,
  uniformSimplexTarget,
} from './targets';

const box = truncatedNormalBoxTarget({ lo: [-1, 0.5, -0.3, -2, -1.5, 0], hi: [1, 2.5, 3, -0.5, 0.2, 0.7] });

const structured: [string, ModelTarget, string][] = [
  ['box of truncated normals', box, 'diagonal'],
  ['Gaussian on the 6-simplex', gaussianOnSimplexTarget({ d: 6, centre: 0.15, sd: 0.2 }), 'diagonal+low-rank'],
  ['order simplex n = 7', orderSimplexTarget(7), 'banded'],
  ['two budgets', twoBudgetsTarget({ d: 7, k: 3 }), 'diagonal+low-rank'],
  ['simplex given by an equality (dense rows after presolve)', equalitySimplexTarget(6), 'dense'],
];

describe.each(structured)('midpoint integrator on the %s', (_name, target, kind) => {
  const p = prepareTarget(target);
  const n = p.n;
  const rng = new Rng(23);
  const lambda = Float64Array.from({ length: n }, () => 0.3 + rng.uniform());
  const integ = new MidpointIntegrator(p, lambda);
  const point = (z: Float64Array) => {
    const ps = integ.newPoint();
    ps.z.set(z);
    expect(integ.evaluate(ps)).toBe('ok');
    return ps;
  };
  const z0 = Float64Array.from(p.centre, (c, q) => c + 0.03 * (q % 2 ? 1 : -1) * (1 + q / n));

  it(`uses the ${kind} factorisation`, () => {
    expect(integ.structure.kind).toBe(kind);
  });

  it('∇(½ log det g) from the leverages matches central finite differences (common practice: h = 1e-6)', () => {
    // ∇U = −∇ℓ + ∇(½ log det g), so gradU + gradL is the log-det term's gradient.
    const ps = point(z0);
    for (let k = 0; k < n; k++) {
      const h = 1e-6;
      const zp = Float64Array.from(z0);
      zp[k] += h;
      const zm = Float64Array.from(z0);
      zm[k] -= h;
      const fd = (0.5 * point(zp).logDet - 0.5 * point(zm).logDet) / (2 * h);
      const an = ps.gradU[k] + ps.gradL[k];
      expect(Math.abs(fd - an)).toBeLessThan(1e-6 * (1 + Math.abs(an)));
    }
  });

  it('one step forward, then one step from the end with negated momentum, returns to the start to 1e-9', () => {
    const eps = 0.15;
    const cur = point(z0);
    const next = integ.newPoint();
    const back = integ.newPoint();
    const pStart = integ.sampleMomentum(cur, new Rng(29), new Float64Array(p.m), new Float64Array(n), new Float64Array(n));
    const pm = Float64Array.from(pStart);
    expect(integ.step(cur, next, pm, eps)).toBe('ok');
    let moved = 0;
    for (let q = 0; q < n; q++) moved = Math.max(moved, Math.abs(next.z[q] - z0[q]));
    expect(moved).toBeGreaterThan(1e-3);
    for (let q = 0; q < n; q++) pm[q] = -pm[q];
    expect(integ.step(next, back, pm, eps)).toBe('ok');
    for (let q = 0; q < n; q++) {
      expect(Math.abs(back.z[q] - z0[q])).toBeLessThan(1e-9);
      expect(Math.abs(-pm[q] - pStart[q])).toBeLessThan(1e-9 * (1 + Math.abs(pStart[q])));
    }
  });

  it('the energy error over 20 steps is small (second-order integrator)', () => {
    let cur = point(z0);
    let next = integ.newPoint();
    const pm = integ.sampleMomentum(cur, new Rng(31), new Float64Array(p.m), new Float64Array(n), new Float64Array(n));
    const h0 = integ.energy(cur, pm);
    for (let s = 0; s < 20; s++) {
      expect(integ.step(cur, next, pm, 0.05)).toBe('ok');
      [cur, next] = [next, cur];
    }
    expect(Math.abs(integ.energy(cur, pm) - h0)).toBeLessThan(0.05);
  });
});

/**
 * Mean and variance of N(0, 1) truncated to [a, b] ("Continuous Univariate Distributions",
 * vol. 1, 2nd ed., Wiley 1994, §13.10.1), Φ and φ from @stdlib/stats-base-dists-normal.
 */
function truncatedMoments(a: number, b: number): { mean: number; variance: number } {
  const phi = (x: number) => normal.pdf(x, 0, 1);
  const Z = a > 0 ? normal.cdf(-a, 0, 1) - normal.cdf(-b, 0, 1) : normal.cdf(b, 0, 1) - normal.cdf(a, 0, 1);
  const mean = (phi(a) - phi(b)) / Z;
  return { mean, variance: 1 + (a * phi(a) - b * phi(b)) / Z - mean * mean };
}

describe('moments on every factorisation path (default midpoint RHMC)', () => {
  it('box (diagonal): truncated normal means and variances per coordinate', () => {
    const run = runChains(box, 'rhmc', { warmup: 300, draws: 1500, seed: 61 });
    expect(run.outs[0].metricStructure).toBe('diagonal');
    const lo = [-1, 0.5, -0.3, -2, -1.5, 0];
    const hi = [1, 2.5, 3, -0.5, 0.2, 0.7];
    for (let j = 0; j < lo.length; j++) {
      const { mean, variance } = truncatedMoments(lo[j], hi[j]);
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);

  it('uniform simplex, d = 15 (diagonal + rank one): Beta(1, d) marginals', () => {
    // Dirichlet(1, …, 1) aggregation ("Continuous Multivariate Distributions", vol. 1, 2nd ed.,
    // Wiley 2000, ch. 49), as in uniform.test.ts.
    const d = 15;
    const run = runChains(uniformSimplexTarget(d), 'rhmc', { warmup: 300, draws: 1000, seed: 62 });
    expect(run.outs[0].metricStructure).toBe('diagonal+low-rank');
    const { mean, variance } = betaMoments(1, d);
    for (let j = 0; j < d; j++) {
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);

  it('order simplex, n = 20 (banded): x_k ~ Beta(k, n + 1 − k)', () => {
    // Order statistics of n uniforms ("Order Statistics", 3rd ed., Wiley 2003, §2.1).
    const n = 20;
    const run = runChains(orderSimplexTarget(n), 'rhmc', { warmup: 300, draws: 1000, seed: 63 });
    expect(run.outs[0].metricStructure).toBe('banded');
    for (let k = 1; k <= n; k++) {
      const { mean, variance } = betaMoments(k, n + 1 - k);
      expectMean(run, k - 1, mean);
      expectVariance(run, k - 1, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);

  it('two budget rows over disjoint groups (diagonal + rank two): Beta(1, 4) and Beta(1, 6) marginals', () => {
    // A product of a 4- and a 6-simplex; each factor's coordinates are Beta(1, size) (Dirichlet
    // aggregation, as above).
    const run = runChains(twoBudgetsTarget({ d: 10, k: 4 }), 'rhmc', { warmup: 300, draws: 1000, seed: 64 });
    expect(run.outs[0].metricStructure).toBe('diagonal+low-rank');
    for (let j = 0; j < 10; j++) {
      const { mean, variance } = betaMoments(1, j < 4 ? 4 : 6);
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);

  it('simplex given by an equality over 11 components (dense after presolve, diagonal plus one low-rank row after the sparse elimination RHMC runs in): Beta(1, 10)', () => {
    const run = runChains(equalitySimplexTarget(11), 'rhmc', { warmup: 300, draws: 1000, seed: 65 });
    expect(run.outs[0].metricStructure).toBe('diagonal+low-rank');
    const { mean, variance } = betaMoments(1, 10);
    for (let j = 0; j < 11; j++) {
      expectMean(run, j, mean);
      expectVariance(run, j, mean, variance);
    }
    expectAllFeasible(run);
  }, 60_000);
});

describe('variants and reproducibility', () => {
  const p = prepareTarget(gaussianOnSimplexTarget({ d: 5, centre: 0.3, sd: 0.2 }));
  const [start] = dispersedStarts(p, 1, new Rng(3));
  const o = { warmup: 60, draws: 40, seed: 99, chain: 0 };
  it.each(['midpoint', 'leapfrog'] as const)('%s: same seed ⇒ identical draws, and the chain reports its integrator', (integrator) => {
    const a = rhmcChain(p, start, o, new Rng(99, 0), makeDrawCheck(p), { integrator });
    const b = rhmcChain(p, start, o, new Rng(99, 0), makeDrawCheck(p), { integrator });
    expect(Array.from(a.draws)).toEqual(Array.from(b.draws));
    expect(a.integrator).toBe(integrator);
    expect(a.stepsPerDraw).toBeGreaterThan(0);
    expect(a.solverIterationsPerStep).toBeGreaterThan(0);
  });
  it('without inequalities the metric is the constant diagonal Λ: nothing is factorised', () => {
    const pe = prepareTarget(bivariateNormalTarget({ m1: 1, m2: -2, s1: 1, s2: 3, r: 0.6 }));
    const out = rhmcChain(pe, pe.centre, { warmup: 50, draws: 20, seed: 1, chain: 0 }, new Rng(1, 0), makeDrawCheck(pe));
    expect(out.metricStructure).toBe('diagonal');
    expect(out.factorizationsPerStep).toBe(0);
  });
  it('the default variant is the midpoint integrator', () => {
    expect(rhmcChain(p, start, o, new Rng(99, 0), makeDrawCheck(p)).integrator).toBe('midpoint');
  });
});
