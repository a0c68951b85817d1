/**
 * The truncated standard normal sampler (server/engine/evidence/truncnormal.ts) against the closed
 * form of the mean and variance of a normal restricted to [a, b] (standard formulas:
 * mean = (φ(a) − φ(b)) / Z, var = 1 + (aφ(a) − bφ(b))/Z − mean², Z = Φ(b) − Φ(a)) with φ and Φ
 * from @stdlib/stats-base-dists-normal (reference library). Fixed seed; |mean − truth| ≤ 4·MCSE.
 */
import { describe, expect, it } from 'vitest';
import normal from '@stdlib/stats-base-dists-normal';
import { truncatedStdNormal } from '../../../server/engine/evidence/truncnormal';
import { Rng } from '../../../server/engine/rng';

const phi = (x: number) => (Number.isFinite(x) ? normal.pdf(x, 0, 1) : 0);
const xphi = (x: number) => (Number.isFinite(x) ? x * normal.pdf(x, 0, 1) : 0);

describe('truncated standard normal', () => {
  for (const [a, b] of [
    [-1, 2],
    [0.5, 0.7],
    [2, Infinity],
    [-Infinity, -3],
    [5, 5.5],
    [-0.1, 0.1],
    [-Infinity, Infinity],
    [-4, 0.3],
  ]) {
    it(`on [${a}, ${b}]`, () => {
      const Z = normal.cdf(b, 0, 1) - normal.cdf(a, 0, 1);
      const mean = (phi(a) - phi(b)) / Z;
      const variance = 1 + (xphi(a) - xphi(b)) / Z - mean * mean;
      const rng = new Rng(123, Math.round(10 * (a + b + 7)) || 1);
      const S = 40_000;
      let s1 = 0;
      let s2 = 0;
      let outside = 0;
      for (let i = 0; i < S; i++) {
        const x = truncatedStdNormal(a, b, rng);
        if (!(x >= a && x <= b)) outside++;
        s1 += x;
        s2 += x * x;
      }
      expect(outside).toBe(0);
      const m = s1 / S;
      const v = s2 / S - m * m;
      const mcse = Math.sqrt(variance / S);
      expect(Math.abs(m - mean)).toBeLessThanOrEqual(4 * mcse);
      // Variance: the MCSE of a sample variance is about σ²·√(2/S) for near-normal shapes; 6× that
      // covers the flatter truncated shapes (a loose check on the spread, the mean above is the sharp one).
      expect(Math.abs(v - variance)).toBeLessThanOrEqual(6 * variance * Math.sqrt(2 / S));
    });
  }
});
