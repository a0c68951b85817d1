/**
 * Sparse elimination of equalities (geometry/elimination.ts) against the presolve's dense
 * orthonormal null-space basis (ml-matrix SVD): the same affine set to 1e-10 on random instances,
 * and the eliminated target's density, gradient and region against the original's.
 */
import { describe, expect, it } from 'vitest';
import { prepareTarget } from '../../../server/engine/geometry';
import { eliminationBasis, eliminatedTarget } from '../../../server/engine/geometry/elimination';
import { detectStructure } from '../../../server/engine/linalg/metric';
import { Rng } from '../../../server/engine/rng';
import type { LinearSystem, ModelTarget } from '../../../server/engine/types';
import { equalitySimplexTarget } from '../samplers/targets';

function randomEqualities(k: number, d: number, rng: Rng): LinearSystem {
  const A = new Float64Array(k * d);
  // Sparse-ish rows with a random pattern, plus a random right-hand side.
  for (let i = 0; i < k * d; i++) A[i] = rng.uniform() < 0.4 ? rng.normal() : 0;
  for (let i = 0; i < k; i++) A[i * d + ((i * 3) % d)] += 2; // no zero row
  return { rows: k, cols: d, A, b: Float64Array.from({ length: k }, () => rng.normal()), labels: [] };
}

describe('sparse elimination of equalities', () => {
  it('spans the dense null space: E N′ = 0, E θ₀′ = e, N N ᵀ N′ = N′ (to 1e-10), random instances', () => {
    const rng = new Rng(2026, 12);
    for (let trial = 0; trial < 25; trial++) {
      const d = 4 + Math.floor(rng.uniform() * 10);
      const k = 1 + Math.floor(rng.uniform() * (d - 2));
      const E = randomEqualities(k, d, rng);
      // The presolve's basis: a target with these equalities and a bound per coordinate.
      const rows = { rows: 2 * d, cols: d, A: new Float64Array(2 * d * d), b: new Float64Array(2 * d).fill(100), labels: [] as string[] };
      for (let j = 0; j < d; j++) (rows.A[2 * j * d + j] = 1), (rows.A[(2 * j + 1) * d + j] = -1);
      const t: ModelTarget = { dim: d, names: Array.from({ length: d }, (_, j) => `x${j}`), logDensity: (_x, g) => (g.fill(0), 0), inequalities: rows, equalities: E };
      const p = prepareTarget(t);
      const el = eliminationBasis(E, d)!;
      expect(el.n).toBe(p.n);
      const { N, n, theta0 } = el;
      for (let i = 0; i < k; i++) {
        let r = -E.b[i];
        for (let j = 0; j < d; j++) r += E.A[i * d + j] * theta0[j];
        expect(Math.abs(r)).toBeLessThan(1e-10);
        for (let q = 0; q < n; q++) {
          let s = 0;
          for (let j = 0; j < d; j++) s += E.A[i * d + j] * N[j * n + q];
          expect(Math.abs(s)).toBeLessThan(1e-10);
        }
      }
      // Projection onto the presolve's span leaves N′ unchanged.
      const P = p.N!;
      for (let q = 0; q < n; q++) {
        const c = new Float64Array(n);
        for (let r = 0; r < n; r++) for (let j = 0; j < d; j++) c[r] += P[j * n + r] * N[j * n + q];
        for (let j = 0; j < d; j++) {
          let v = 0;
          for (let r = 0; r < n; r++) v += P[j * n + r] * c[r];
          expect(Math.abs(v - N[j * n + q])).toBeLessThan(1e-10);
        }
      }
    }
  });

  it('a simplex keeps a diagonal-plus-low-rank metric; density, gradient and slacks equal the presolve target’s at the same θ', () => {
    const base = equalitySimplexTarget(8);
    // A varying density: Σ c_j log θ_j (a Dirichlet kernel), gradient c_j / θ_j.
    const c = [1, 2, 0.5, 3, 1, 1, 2, 0.7];
    const t: ModelTarget = {
      ...base,
      logDensity: (x, g) => {
        let l = 0;
        for (let j = 0; j < 8; j++) (l += c[j] * Math.log(x[j])), (g[j] = c[j] / x[j]);
        return l;
      },
    };
    const p = prepareTarget(t);
    expect(detectStructure(p.rows).kind).toBe('dense');
    const el = eliminatedTarget(p)!;
    expect(detectStructure(el.q.rows).kind).toBe('diagonal+low-rank');
    const rng = new Rng(5, 5);
    for (let trial = 0; trial < 10; trial++) {
      // A random interior point of the presolve's coordinates: the centre plus a small step.
      const z = Float64Array.from(p.centre, (v) => v + 0.02 * rng.normal());
      const w = el.fromZ(z);
      const th1 = new Float64Array(8);
      const th2 = new Float64Array(8);
      p.toTheta(z, th1);
      el.q.toTheta(w, th2);
      for (let j = 0; j < 8; j++) expect(Math.abs(th1[j] - th2[j])).toBeLessThan(1e-12);
      const gz = new Float64Array(p.n);
      const gw = new Float64Array(el.q.n);
      expect(el.q.logDensity(w, gw)).toBeCloseTo(p.logDensity(z, gz), 12);
      // Chain rule: ∇_w = N′ᵀ ∇θ, checked against a central difference along each w coordinate.
      for (let q = 0; q < el.q.n; q++) {
        const h = 1e-6;
        const wp = Float64Array.from(w);
        const wm = Float64Array.from(w);
        wp[q] += h;
        wm[q] -= h;
        const fd = (el.q.logDensity(wp, new Float64Array(el.q.n)) - el.q.logDensity(wm, new Float64Array(el.q.n))) / (2 * h);
        expect(Math.abs(fd - gw[q])).toBeLessThan(1e-5 * (1 + Math.abs(gw[q])));
      }
      // Same region: every original row holds at θ, and the eliminated rows' slacks are positive.
      const s = new Float64Array(el.q.m);
      el.q.rows.mul(w, s);
      for (let i = 0; i < el.q.m; i++) expect(el.q.b[i] - s[i]).toBeGreaterThan(0);
    }
  });
});
