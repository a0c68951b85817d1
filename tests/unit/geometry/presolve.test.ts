/**
 * Presolve, interior start and the messages for regions that are empty or have no interior.
 * Expected values are worked out by hand in the comments (elementary linear algebra).
 */
import { describe, expect, it } from 'vitest';
import { checkRegion, dispersedStarts, prepareTarget, RegionError } from '../../../server/engine/geometry';
import { Rng } from '../../../server/engine/rng';
import type { ModelTarget } from '../../../server/engine/types';
import { emptySystem, equalitySimplexTarget, orderedMeansTarget, system, uniformSimplexTarget } from '../samplers/targets';

const flatTarget = (dim: number, ineq = emptySystem(dim), eq = emptySystem(dim)): ModelTarget => ({
  dim,
  names: Array.from({ length: dim }, (_, i) => `x[${i + 1}]`),
  logDensity: (_t, g) => {
    g.fill(0);
    return 0;
  },
  inequalities: ineq,
  equalities: eq,
});

function expectRegionError(fn: () => unknown, labels: string[], phrase: RegExp): void {
  try {
    fn();
  } catch (e) {
    expect(e).toBeInstanceOf(RegionError);
    const err = e as RegionError;
    expect([...err.conflicting].sort()).toEqual([...labels].sort());
    expect(err.message).toMatch(phrase);
    for (const l of labels) expect(err.message).toContain(l);
    return;
  }
  throw new Error('expected a RegionError');
}

describe('presolve', () => {
  it('the 3-simplex: centre is the analytic centre (1/4, 1/4, 1/4) by symmetry, region bounded', () => {
    const p = prepareTarget(uniformSimplexTarget(3));
    expect(p.n).toBe(3);
    expect(p.m).toBe(4);
    expect(p.bounded).toBe(true);
    for (const c of p.centre) expect(c).toBeCloseTo(0.25, 9);
  });

  it('equalities: θ = θ₀ + N z with N orthonormal and every z mapping onto E θ = e', () => {
    const p = prepareTarget(equalitySimplexTarget(4));
    expect(p.n).toBe(3);
    const N = p.N!;
    for (let a = 0; a < 3; a++)
      for (let c = 0; c < 3; c++) {
        let s = 0;
        for (let j = 0; j < 4; j++) s += N[j * 3 + a] * N[j * 3 + c];
        expect(s).toBeCloseTo(a === c ? 1 : 0, 12);
      }
    const theta = new Float64Array(4);
    p.toTheta(Float64Array.from([0.3, -1.2, 2]), theta);
    expect(theta.reduce((s, v) => s + v, 0)).toBeCloseTo(1, 12);
    // the analytic centre of the probability simplex is its barycentre
    p.toTheta(p.centre, theta);
    for (const v of theta) expect(v).toBeCloseTo(0.25, 8);
  });

  it('drops zero rows, merges duplicates and scaled duplicates, keeping the tightest bound', () => {
    const ineq = system(2, [
      { a: { 0: -1 }, b: 0, label: 'x >= 0' },
      { a: { 0: -2 }, b: 0, label: '2x >= 0' },
      { a: { 1: -1 }, b: 0, label: 'y >= 0' },
      { a: { 0: 1, 1: 1 }, b: 2, label: 'x + y <= 2' },
      { a: { 0: 3, 1: 3 }, b: 3, label: '3x + 3y <= 3' },
      { a: {}, b: 5, label: '0 <= 5' },
    ]);
    const p = prepareTarget(flatTarget(2, ineq));
    expect(p.m).toBe(3);
    expect(p.rowLabels).toContain('3x + 3y <= 3');
    expect(p.rowLabels).not.toContain('x + y <= 2');
  });

  it('a region with no inequality is allowed and unbounded', () => {
    const p = prepareTarget(flatTarget(3));
    expect(p.m).toBe(0);
    expect(p.bounded).toBe(false);
  });

  it('an ordering without bounds is unbounded but gets a finite, strictly interior centre', () => {
    const p = prepareTarget(orderedMeansTarget({ y: [1, 2, 3, 4], sigma: 1 }));
    expect(p.bounded).toBe(false);
    for (let j = 0; j < 3; j++) expect(p.centre[j]).toBeLessThan(p.centre[j + 1]);
  });
});

describe('empty regions and regions without interior name the conflicting constraints', () => {
  it('two opposite bounds that cannot both hold', () => {
    const ineq = system(2, [
      { a: { 0: -1 }, b: -1, label: 'x >= 1' },
      { a: { 0: 1 }, b: 0, label: 'x <= 0' },
      { a: { 1: 1 }, b: 4, label: 'y <= 4' },
    ]);
    expectRegionError(() => prepareTarget(flatTarget(2, ineq)), ['x >= 1', 'x <= 0'], /cannot both hold/);
  });

  it('x ≤ 1 and x ≥ 1 leave no interior: "cannot both hold strictly"', () => {
    const ineq = system(2, [
      { a: { 0: 1 }, b: 1, label: 'x <= 1' },
      { a: { 1: -1 }, b: 0, label: 'y >= 0' },
      { a: { 0: -1 }, b: -1, label: 'x >= 1' },
    ]);
    expectRegionError(() => prepareTarget(flatTarget(2, ineq)), ['x <= 1', 'x >= 1'], /cannot both hold strictly/);
  });

  it('three rows that are jointly infeasible, found by phase 1 (x ≥ 0.6, y ≥ 0.6, x + y ≤ 1)', () => {
    const ineq = system(3, [
      { a: { 0: -1 }, b: -0.6, label: 'x >= 0.6' },
      { a: { 2: 1 }, b: 5, label: 'z <= 5' },
      { a: { 1: -1 }, b: -0.6, label: 'y >= 0.6' },
      { a: { 2: -1 }, b: 5, label: 'z >= -5' },
      { a: { 0: 1, 1: 1 }, b: 1, label: 'x + y <= 1' },
    ]);
    expectRegionError(() => prepareTarget(flatTarget(3, ineq)), ['x >= 0.6', 'y >= 0.6', 'x + y <= 1'], /cannot all hold at once/);
  });

  it('a region squeezed to a point (x ≥ 0, y ≥ 0, x + y ≤ 0) has no interior', () => {
    const ineq = system(3, [
      { a: { 0: -1 }, b: 0, label: 'x >= 0' },
      { a: { 1: -1 }, b: 0, label: 'y >= 0' },
      { a: { 2: 1 }, b: 1, label: 'z <= 1' },
      { a: { 0: 1, 1: 1 }, b: 0, label: 'x + y <= 0' },
    ]);
    expectRegionError(() => prepareTarget(flatTarget(3, ineq)), ['x >= 0', 'y >= 0', 'x + y <= 0'], /cannot all hold strictly/);
  });

  it('contradictory equalities are named (x + y = 1, z = 0, 2x + 2y = 3)', () => {
    const eq = system(3, [
      { a: { 0: 1, 1: 1 }, b: 1, label: 'x + y == 1' },
      { a: { 2: 1 }, b: 0, label: 'z == 0' },
      { a: { 0: 2, 1: 2 }, b: 3, label: '2x + 2y == 3' },
    ]);
    expectRegionError(() => prepareTarget(flatTarget(3, emptySystem(3), eq)), ['x + y == 1', '2x + 2y == 3'], /contradict/);
  });

  it('an inequality that contradicts the equalities (Σw = 1 with w₁ ≥ 2 and w ≥ 0)', () => {
    const t = equalitySimplexTarget(3);
    const rows: { a: Record<number, number>; b: number; label: string }[] = [
      { a: { 0: -1 }, b: 0, label: 'w[1] >= 0' },
      { a: { 1: -1 }, b: 0, label: 'w[2] >= 0' },
      { a: { 2: -1 }, b: 0, label: 'w[3] >= 0' },
      { a: { 0: -1 }, b: -2, label: 'w[1] >= 2' },
    ];
    const r = checkRegion(system(3, rows), t.equalities);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.conflicting).toContain('w[1] >= 2');
      expect(r.conflicting).not.toContain('w[1] >= 0');
      expect(r.message).toMatch(/cannot all hold/);
    }
  });

  it('checkRegion returns an interior point and the dimension left after the equalities', () => {
    const t = equalitySimplexTarget(5);
    const r = checkRegion(t.inequalities, t.equalities);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.dimension).toBe(4);
      expect(r.interiorPoint.reduce((s, v) => s + v, 0)).toBeCloseTo(1, 10);
      for (const v of r.interiorPoint) expect(v).toBeGreaterThan(0);
    }
  });
});

describe('dispersed starts', () => {
  it('are strictly interior, distinct, and reproducible from the seed', () => {
    const p = prepareTarget(uniformSimplexTarget(6));
    const a = dispersedStarts(p, 4, new Rng(5));
    const b = dispersedStarts(p, 4, new Rng(5));
    expect(a).toEqual(b);
    for (const z of a) {
      const s = z.reduce((x, y) => x + y, 0);
      expect(s).toBeLessThan(1);
      for (const v of z) expect(v).toBeGreaterThan(0);
    }
    expect(a[0]).not.toEqual(a[1]);
  });

  it('a log-density that is not finite at the start gives a clear error, not a hang', () => {
    const t = uniformSimplexTarget(3);
    const bad: ModelTarget = { ...t, logDensity: () => NaN };
    const p = prepareTarget(bad);
    expect(() => dispersedStarts(p, 2, new Rng(1))).toThrow(/log-density is not a number at the starting point/);
  });
});
