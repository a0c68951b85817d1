/**
 * The region's projection onto two coordinates (server/engine/geometry/project.ts).
 *
 * Sources of the expected values:
 * - handbook geometry: the projection of a polytope is the convex hull of the projections of its
 *   vertices ("Basic properties of convex polytopes", Handbook of Discrete and Computational
 *   Geometry, 3rd ed., 2017); the vertices of a box are its corners, those of the standard simplex
 *   {x ≥ 0, Σx ≤ 1} are 0 and the unit vectors, those of the probability simplex the unit vectors;
 * - for the random polytope, its vertices are enumerated by brute force (every choice of `d` rows
 *   held with equality, solved, kept when feasible), an approach independent of the linear
 *   programmes of the method under test;
 * - containment: every draw of a fit lies in the region (the samplers check each kept draw), hence
 *   its two coordinates lie in the projection; checked to 1e-9.
 */
import { describe, expect, it } from 'vitest';
import { Matrix, SVD, solve } from 'ml-matrix';
import { convexHull, insidePolygon, projectRegion, simplexMax } from '../../../server/engine/geometry/project';
import { Rng } from '../../../server/engine/rng';
import type { ModelTarget } from '../../../server/engine/types';
import { emptySystem, equalitySimplexTarget, orderedMeansTarget, system, uniformSimplexTarget } from '../samplers/targets';
import { runChains } from '../samplers/run';

const flat = (_t: Float64Array, g: Float64Array) => {
  g.fill(0);
  return 0;
};

function boxTarget(lo: number[], hi: number[]): ModelTarget {
  const d = lo.length;
  const rows = [];
  for (let k = 0; k < d; k++) {
    rows.push({ a: { [k]: -1 }, b: -lo[k] }, { a: { [k]: 1 }, b: hi[k] });
  }
  return { dim: d, names: lo.map((_, k) => `x[${k + 1}]`), logDensity: flat, inequalities: system(d, rows), equalities: emptySystem(d) };
}

/** A random bounded polytope in ℝ^d around the origin: random unit-normal rows plus a box of ±3. */
function randomPolytope(d: number, rows: number, seed: number): ModelTarget {
  const rng = new Rng(seed, 0);
  const list: { a: Record<number, number>; b: number }[] = [];
  for (let r = 0; r < rows; r++) {
    const a: Record<number, number> = {};
    for (let k = 0; k < d; k++) a[k] = rng.normal();
    list.push({ a, b: 0.5 + rng.uniform() });
  }
  for (let k = 0; k < d; k++) list.push({ a: { [k]: 1 }, b: 3 }, { a: { [k]: -1 }, b: 3 });
  return { dim: d, names: Array.from({ length: d }, (_, k) => `x[${k + 1}]`), logDensity: flat, inequalities: system(d, list), equalities: emptySystem(d) };
}

/** Every vertex of {A x ≤ b} by trying each d-subset of rows (small problems only). */
function bruteVertices(t: ModelTarget): number[][] {
  const { A, b, rows } = t.inequalities;
  const d = t.dim;
  const out: number[][] = [];
  const pick: number[] = [];
  const rec = (from: number) => {
    if (pick.length === d) {
      const M = new Matrix(pick.map((r) => Array.from(A.subarray(r * d, (r + 1) * d))));
      let x: number[];
      try {
        if (Math.abs(detLike(M)) < 1e-10) return;
        x = solve(M, Matrix.columnVector(pick.map((r) => b[r]))).to1DArray();
      } catch {
        return;
      }
      for (let r = 0; r < rows; r++) {
        let s = 0;
        for (let k = 0; k < d; k++) s += A[r * d + k] * x[k];
        if (s > b[r] + 1e-9) return;
      }
      out.push(x);
      return;
    }
    for (let r = from; r < rows; r++) {
      pick.push(r);
      rec(r + 1);
      pick.pop();
    }
  };
  rec(0);
  return out;
}

/** Smallest singular value: the test of a regular system. */
function detLike(M: Matrix): number {
  return Math.min(...new SVD(M).diagonal);
}

/** Two convex polygons are equal when each vertex of one is a vertex of the other (to tol). */
function expectSamePolygon(got: [number, number][], want: [number, number][], tol = 1e-8) {
  expect(got.length).toBe(want.length);
  for (const w of want) expect(got.some((g) => Math.abs(g[0] - w[0]) < tol && Math.abs(g[1] - w[1]) < tol)).toBe(true);
}

function area(poly: [number, number][]): number {
  let s = 0;
  for (let k = 0; k < poly.length; k++) {
    const [x1, y1] = poly[k];
    const [x2, y2] = poly[(k + 1) % poly.length];
    s += x1 * y2 - x2 * y1;
  }
  return s / 2;
}

describe('simplexMax', () => {
  it('solves a textbook LP: max 3x + 5y, x ≤ 4, 2y ≤ 12, 3x + 2y ≤ 18 → 36 at (2, 6)', () => {
    // The worked example of many operations-research textbooks (common practice); optimum by hand:
    // the corner of 2y = 12 and 3x + 2y = 18.
    const res = simplexMax(Float64Array.from([3, 5]), Float64Array.from([1, 0, 0, 2, 3, 2]), Float64Array.from([4, 12, 18]), 3, 2);
    expect(res.status).toBe('optimal');
    if (res.status !== 'optimal') return;
    expect(res.value).toBeCloseTo(36, 12);
    expect(res.y[0]).toBeCloseTo(2, 12);
    expect(res.y[1]).toBeCloseTo(6, 12);
  });

  it('reports an unbounded LP', () => {
    expect(simplexMax(Float64Array.from([1, 0]), Float64Array.from([0, 1]), Float64Array.from([1]), 1, 2).status).toBe('unbounded');
  });
});

describe('projectRegion: known projections', () => {
  it('a box projects to the rectangle of its two ranges', () => {
    const t = boxTarget([0, -2, 0.5], [1, 3, 5]);
    const pr = projectRegion(t, 0, 1);
    expectSamePolygon(pr.vertices, [[0, -2], [1, -2], [1, 3], [0, 3]]);
    expect(area(pr.vertices)).toBeCloseTo(5, 10); // counter-clockwise: positive area
    expectSamePolygon(projectRegion(t, 2, 1).vertices, [[0.5, -2], [5, -2], [5, 3], [0.5, 3]]);
  });

  it('the standard 3-simplex {x ≥ 0, Σx ≤ 1} projects to the unit triangle', () => {
    const pr = projectRegion(uniformSimplexTarget(3), 0, 2);
    expectSamePolygon(pr.vertices, [[0, 0], [1, 0], [0, 1]]);
  });

  it('the probability simplex (Σw = 1 as an equality) projects to the unit triangle, for 3 and 5 shares', () => {
    expectSamePolygon(projectRegion(equalitySimplexTarget(3), 0, 1).vertices, [[0, 0], [1, 0], [0, 1]]);
    expectSamePolygon(projectRegion(equalitySimplexTarget(5), 3, 1).vertices, [[0, 0], [1, 0], [0, 1]]);
  });

  it('two shares of two summing to one project to a segment', () => {
    const pr = projectRegion(equalitySimplexTarget(2), 0, 1);
    expectSamePolygon(pr.vertices, [[0, 1], [1, 0]]);
  });

  it('ordered means μ₁ ≤ μ₂ ≤ μ₃ projected on (μ₁, μ₃) within a clip box: the half-plane μ₁ ≤ μ₃ cut by the box', () => {
    const t = orderedMeansTarget({ y: [0, 1, 2], sigma: 1 });
    expect(() => projectRegion(t, 0, 2)).toThrow(/unbounded/);
    const pr = projectRegion(t, 0, 2, { clip: { xmin: -1, xmax: 3, ymin: -1, ymax: 3 } });
    expectSamePolygon(pr.vertices, [[-1, -1], [3, 3], [-1, 3]]);
    expect(pr.clipped).toBe(true);
  });

  it('a random polytope in ℝ⁴: equals the hull of its enumerated vertices, projected', () => {
    for (const seed of [11, 12, 13]) {
      const t = randomPolytope(4, 9, seed);
      const verts = bruteVertices(t);
      expect(verts.length).toBeGreaterThan(4);
      for (const [i, j] of [[0, 1], [2, 3], [3, 0]]) {
        const want = convexHull(verts.map((v) => [v[i], v[j]] as [number, number]), 1e-9);
        const got = projectRegion(t, i, j).vertices;
        expectSamePolygon(got, want, 1e-7);
      }
    }
  });
});

describe('projectRegion: every draw of a fit lies inside the drawn polygon (tolerance 1e-9)', () => {
  const allInside = (t: ModelTarget, sampler: 'hitrun' | 'rhmc', pairs: [number, number][], seed: number) => {
    const run = runChains(t, sampler, { chains: 2, warmup: 200, draws: 800, seed });
    const d = t.dim;
    for (const [i, j] of pairs) {
      let xmin = Infinity, xmax = -Infinity, ymin = Infinity, ymax = -Infinity;
      for (const o of run.outs)
        for (let k = 0; k < run.draws; k++) {
          const x = o.draws[k * d + i];
          const y = o.draws[k * d + j];
          xmin = Math.min(xmin, x); xmax = Math.max(xmax, x); ymin = Math.min(ymin, y); ymax = Math.max(ymax, y);
        }
      const clip = { xmin: xmin - 1, xmax: xmax + 1, ymin: ymin - 1, ymax: ymax + 1 };
      const poly = projectRegion(run.p, i, j, { clip }).vertices;
      let outside = 0;
      for (const o of run.outs) for (let k = 0; k < run.draws; k++) if (!insidePolygon(poly, o.draws[k * d + i], o.draws[k * d + j], 1e-9)) outside++;
      expect(outside).toBe(0);
    }
  };

  it('a simplex model (4 shares summing to one)', () => {
    allInside(equalitySimplexTarget(4), 'hitrun', [[0, 1], [1, 3], [2, 0]], 31);
  });

  it('an ordered model (five ordered means)', () => {
    allInside(orderedMeansTarget({ y: [0.3, 0.1, 0.5, 0.4, 0.9], sigma: 0.5 }), 'hitrun', [[0, 1], [0, 4], [2, 3]], 32);
  });

  it('a random polytope', () => {
    allInside(randomPolytope(4, 9, 12), 'hitrun', [[0, 1], [1, 2], [3, 0]], 33);
  });

  it('the slice through the mean would not contain them (why the view changed): simplex draws are off the slice', () => {
    // With 3 shares summing to one, holding w₃ at its mean leaves only the line w₁ + w₂ = 1 − mean(w₃);
    // draws have other w₃ and miss that line, while the projection (the triangle) holds all of them.
    const t = equalitySimplexTarget(3);
    const run = runChains(t, 'hitrun', { chains: 1, warmup: 100, draws: 400, seed: 34 });
    let off = 0;
    for (let k = 0; k < run.draws; k++) {
      const w = run.outs[0].draws.subarray(k * 3, k * 3 + 3);
      if (Math.abs(w[0] + w[1] - (1 - 1 / 3)) > 1e-3) off++;
    }
    expect(off).toBeGreaterThan(run.draws * 0.9);
    const poly = projectRegion(run.p, 0, 1).vertices;
    for (let k = 0; k < run.draws; k++) expect(insidePolygon(poly, run.outs[0].draws[k * 3], run.outs[0].draws[k * 3 + 1])).toBe(true);
  });
});
