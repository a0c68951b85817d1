/**
 * Shape detection and transforms of the transform-based engine, the automatic choice's
 * reproducibility, and the benchmark problems' determinism.
 */
import { describe, expect, it } from 'vitest';
import { prepareTarget } from '../../../server/engine/geometry';
import { compileProgram } from '../../../server/engine/compile';
import { detectTransformShape, TransformMap } from '../../../server/engine/samplers/transform-hmc';
import { chooseEngine, pilotStart, sampleChain } from '../../../server/engine/samplers';
import { startsFromApproximation, startsFromPilot } from '../../../server/engine/samplers/auto';
import { bulkApproximation } from '../../../server/engine/mode';
import normal from '@stdlib/stats-base-dists-normal';
import { runFit } from '../../../server/engine/fit';
import { Rng } from '../../../server/engine/rng';
import { PROBLEMS } from '../../../bench/problems';
import { gaussianOnSimplexTarget, orderSimplexTarget, system, emptySystem } from './targets';
import type { ModelTarget } from '../../../server/engine/types';

describe('transform-based HMC: shapes', () => {
  it('recognises bounds, simplices and orderings in a compiled model, and refuses a general polytope', () => {
    const ok = compileProgram(
      [
        'unknown w[4], m[3], s, b',
        'term ld_dirichlet(w, 2) + ld_normal(m, 0, 1) + ld_exponential(s, 1) + ld_normal(b, 0, 1)',
        'constrain w >= 0',
        'constrain sum(w) == 1',
        'constrain 0 <= m[1] <= m[2] <= m[3]',
        'constrain 0.1 <= s <= 5',
      ].join('\n'),
      {},
    );
    const shape = detectTransformShape(ok);
    expect(shape.ok).toBe(true);
    if (shape.ok) expect(shape.plan.description).toBe('1 simplex, 1 ordering, 1 bounded unknown, 1 free unknown');
    const bad = compileProgram('unknown a, b\nterm ld_normal(a, 0, 1) + ld_normal(b, 0, 1)\nconstrain a + 2 * b <= 1', {});
    const r = detectTransformShape(bad);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/line 3: a \+ 2 \* b <= 1|not a bound, an ordering/);
    const p = prepareTarget(bad);
    expect(() => sampleChain(p, 'transform-hmc', p.centre, { warmup: 10, draws: 10, seed: 1, chain: 0 })).toThrow(/bounds, simplices and orderings/);
  });

  it('log π(y) = ℓ(T(y)) + log|J|: the reverse sweep matches central finite differences', () => {
    // Internal consistency against numerical differentiation (common practice for gradient code).
    const t: ModelTarget = {
      dim: 7,
      names: ['w1', 'w2', 'w3', 'o1', 'o2', 'o3', 'u'],
      logDensity: (x, g) => {
        let l = 0;
        for (let j = 0; j < 7; j++) {
          l += Math.sin(1 + j) * x[j] - 0.3 * x[j] * x[j];
          g[j] = Math.sin(1 + j) - 0.6 * x[j];
        }
        return l;
      },
      // w ≥ 0, Σw ≤ 1 (3 parts + slack); −1 ≤ o1 ≤ o2 ≤ o3 + 0.2 ≤ … ≤ 4 (chain bounded at both ends); u ≤ 2.
      inequalities: system(7, [
        { a: { 0: -1 }, b: 0 },
        { a: { 1: -1 }, b: 0 },
        { a: { 2: -1 }, b: 0 },
        { a: { 0: 1, 1: 1, 2: 1 }, b: 1 },
        { a: { 3: -1 }, b: 1 },
        { a: { 3: 1, 4: -1 }, b: 0 },
        { a: { 4: 1, 5: -1 }, b: -0.2 },
        { a: { 5: 1 }, b: 4 },
        { a: { 6: 1 }, b: 2 },
      ]),
      equalities: emptySystem(7),
    };
    const shape = detectTransformShape(t);
    expect(shape.ok).toBe(true);
    if (!shape.ok) return;
    const map = new TransformMap(shape.plan);
    const k = shape.plan.k;
    expect(k).toBe(7);
    const theta = new Float64Array(7);
    const gTheta = new Float64Array(7);
    const f = (y: Float64Array, gy?: Float64Array) => {
      const lj = map.forward(y, theta);
      const l = t.logDensity(theta, gTheta);
      if (gy) map.backward(y, gTheta, gy);
      return l + lj;
    };
    const rng = new Rng(3);
    const y = new Float64Array(k);
    for (let q = 0; q < k; q++) y[q] = rng.normal();
    const g = new Float64Array(k);
    f(y, g);
    for (let q = 0; q < k; q++) {
      const h = 1e-6;
      const yp = Float64Array.from(y);
      const ym = Float64Array.from(y);
      yp[q] += h;
      ym[q] -= h;
      expect(g[q]).toBeCloseTo((f(yp) - f(ym)) / (2 * h), 5);
    }
    // The map lands inside the region and the inverse recovers y.
    map.forward(y, theta);
    expect(theta[2] + theta[1] + theta[0]).toBeLessThan(1);
    expect(theta[4] - theta[5]).toBeLessThanOrEqual(-0.2);
    const back = new Float64Array(k);
    map.inverse(theta, back);
    for (let q = 0; q < k; q++) expect(back[q]).toBeCloseTo(y[q], 8);
  });
});

describe('automatic choice', () => {
  it('a flat density on standard shapes takes transform-based HMC by rule, without pilots; same model and seed ⇒ identical draws', async () => {
    const spec = { kind: 'program' as const, source: 'unknown x[4]\nconstrain 0 <= x[1]\nconstrain diff(x) >= 0\nconstrain x[4] <= 1', tables: {} };
    const a = await runFit(spec, { chains: 2, warmup: 150, draws: 150, seed: 3 }, { parallel: false });
    const b = await runFit(spec, { chains: 2, warmup: 150, draws: 150, seed: 3 }, { parallel: false });
    expect(a.summary.diagnostics.samplerUsed).toBe('transform-hmc');
    expect(a.summary.diagnostics.samplerReason).toMatch(/without pilots/);
    expect(a.summary.diagnostics.samplerReason).toBe(b.summary.diagnostics.samplerReason);
    expect(Array.from(a.chains[1].draws)).toEqual(Array.from(b.chains[1].draws));
    // The same draws as the engine chosen explicitly (the rule adds nothing to the chains).
    const c = await runFit(spec, { chains: 2, warmup: 150, draws: 150, seed: 3, sampler: 'transform-hmc' }, { parallel: false });
    expect(Array.from(a.chains[1].draws)).toEqual(Array.from(c.chains[1].draws));
  }, 60_000);

  it('pilots from the bulk point, chains from the chosen pilot\'s overdispersed draws: truncated normal means match the handbook within 4 MCSE', async () => {
    // x ~ N(0, 1) truncated to x ≥ 1, y ~ N(0, 1) truncated to y ≥ 0.5: mean φ(a)/(1 − Φ(a))
    // ("Continuous Univariate Distributions", vol. 1, 2nd ed., Wiley 1994, ch. 13, truncated normal).
    // The row x + 2y ≤ 30 makes the region a general polytope (so the choice pilots its candidates)
    // and moves the means by less than 1e-20: P(x + 2y > 30) ≤ P(x > 10) + P(y > 10) < 1e-20 for these truncated normals (from the normal tail).
    const spec = { kind: 'program' as const, source: 'unknown x, y\nterm ld_normal(x, 0, 1) + ld_normal(y, 0, 1)\nconstrain x >= 1\nconstrain y >= 0.5\nconstrain x + 2 * y <= 30', tables: {} };
    // 4 × (2,500 + 2,500) iterations: long enough for RHMC's pilot next to the reflective engine's.
    const r = await runFit(spec, { chains: 4, warmup: 2500, draws: 2500, seed: 11 }, { parallel: false });
    expect(r.summary.diagnostics.samplerReason).toMatch(/Pilot chains/);
    expect(r.summary.diagnostics.samplerReason).toMatch(/overdispersed/);
    for (const [name, a] of [['x', 1], ['y', 0.5]] as const) {
      const qs = r.summary.quantities.find((x) => x.name === name)!;
      const truth = normal.pdf(a, 0, 1) / (1 - normal.cdf(a, 0, 1));
      expect(Math.abs(qs.mean - truth)).toBeLessThan(4 * qs.mcseMean);
      expect(qs.rhat).toBeLessThan(1.01);
    }
    // Starts from a pilot: strictly inside, deterministic in the seed, and not all equal.
    const p = prepareTarget(compileProgram(spec.source, {}));
    const bulk = pilotStart(p, p.centre);
    const pilot = sampleChain(p, 'reflect-hmc', bulk, { warmup: 50, draws: 50, seed: 1, chain: 1000 });
    const s1 = startsFromPilot(p, bulk, pilot, 4, new Rng(1, 2))!;
    const s2 = startsFromPilot(p, bulk, pilot, 4, new Rng(1, 2))!;
    expect(s1.map((z) => Array.from(z))).toEqual(s2.map((z) => Array.from(z)));
    for (const z of s1) {
      expect(z[0]).toBeGreaterThan(1);
      expect(z[1]).toBeGreaterThan(0.5);
    }
    expect(new Set(s1.map((z) => z[0])).size).toBeGreaterThan(1);
  }, 60_000);

  it('a fit too short for pilots starts its chains from the widened Gaussian approximation at the bulk point: truncated normal means within 4 MCSE', async () => {
    // Same targets and handbook means as above; 4 chains × (50 + 50) leaves no room for pilots.
    const spec = { kind: 'program' as const, source: 'unknown x, y\nterm ld_normal(x, 0, 1) + ld_normal(y, 0, 1)\nconstrain x >= 1\nconstrain y >= 0.5\nconstrain x + 2 * y <= 30', tables: {} };
    const r = await runFit(spec, { chains: 4, warmup: 50, draws: 50, seed: 12 }, { parallel: false });
    expect(r.summary.diagnostics.samplerReason).toMatch(/too short for pilots/);
    expect(r.summary.diagnostics.samplerReason).toMatch(/Gaussian approximation/);
    for (const [name, a] of [['x', 1], ['y', 0.5]] as const) {
      const qs = r.summary.quantities.find((x) => x.name === name)!;
      const truth = normal.pdf(a, 0, 1) / (1 - normal.cdf(a, 0, 1));
      expect(Math.abs(qs.mean - truth)).toBeLessThan(4 * qs.mcseMean);
    }
    const p = prepareTarget(compileProgram(spec.source, {}));
    const b = bulkApproximation(p);
    const s1 = startsFromApproximation(p, b.z, b.factor, 8, new Rng(3, 4))!;
    expect(s1.map((z) => Array.from(z))).toEqual(startsFromApproximation(p, b.z, b.factor, 8, new Rng(3, 4))!.map((z) => Array.from(z)));
    for (const z of s1) {
      expect(z[0]).toBeGreaterThan(1);
      expect(z[1]).toBeGreaterThan(0.5);
    }
  }, 60_000);

  it('a varying density on a simplex shortlists transform-based HMC and pilots decide deterministically', async () => {
    const p = prepareTarget(gaussianOnSimplexTarget({ d: 5, centre: 0.15, sd: 0.05 }));
    const pilots = async (jobs: Parameters<Parameters<typeof chooseEngine>[2]>[0]) =>
      jobs.map((j) => sampleChain(p, j.engine, j.start, { warmup: j.warmup, draws: j.draws, seed: 9, chain: j.chain }));
    const c1 = await chooseEngine(p, { start: p.centre, fitIterations: 4000, evalCost: 100 }, pilots);
    const c2 = await chooseEngine(p, { start: p.centre, fitIterations: 4000, evalCost: 100 }, pilots);
    expect(c1).toEqual(c2);
    expect(c1.reason).toMatch(/transform-hmc/);
  }, 60_000);
});

describe('benchmark problems', () => {
  it('are deterministic in the seed: same seed ⇒ same text and tables; another seed ⇒ other data', () => {
    for (const [id, make] of Object.entries(PROBLEMS)) {
      const a = make(11);
      const b = make(11);
      expect(a.source).toBe(b.source);
      expect(a.id).toBe(id);
      for (const [name, t] of Object.entries(a.tables)) {
        for (const [c, col] of Object.entries(t.columns)) expect(Array.from(col.values)).toEqual(Array.from(b.tables[name].columns[c].values));
      }
    }
    const c = PROBLEMS.P6(12);
    expect(Array.from(c.tables.poly.columns.bound.values)).not.toEqual(Array.from(PROBLEMS.P6(11).tables.poly.columns.bound.values));
  });

  it('every problem is a valid program of the model language and compiles with its tables', () => {
    for (const make of Object.values(PROBLEMS)) {
      const pr = make(11);
      const t = compileProgram(pr.source, pr.tables);
      expect(t.dim).toBeGreaterThan(0);
      const z = new Float64Array(t.dim);
      expect(Number.isNaN(t.logDensity(z, new Float64Array(t.dim)))).toBe(false);
    }
  });

  it('P1 compiles to the order simplex of the sampler tests (same rows)', () => {
    const t = compileProgram(PROBLEMS.P1().source, {});
    const ref = orderSimplexTarget(50);
    expect(t.dim).toBe(50);
    expect(t.inequalities.rows).toBe(ref.inequalities.rows);
    const p = prepareTarget(t);
    expect(p.bounded).toBe(true);
  });
});
