/**
 * The projections the draws route sends: bounded pairs whole, unbounded ones cut by a box around
 * the draws. Expected polygons by handbook geometry (the projection of a polytope is the hull of
 * its projected vertices): the probability simplex projects to the unit triangle on any two shares.
 */
import { describe, expect, it } from 'vitest';
import { regionProjections } from '../../../server/notebook/projections';

describe('regionProjections', () => {
  it('three shares summing to one: every pair is the unit triangle, not clipped; an ordered pair is cut by the box', () => {
    const region = {
      names: ['w[1]', 'w[2]', 'w[3]', 'a', 'b'],
      A: [[-1, 0, 0, 0, 0], [0, -1, 0, 0, 0], [0, 0, -1, 0, 0], [0, 0, 0, 1, -1]],
      b: [0, 0, 0, 0],
      labels: ['w1', 'w2', 'w3', 'a <= b'],
      E: [[1, 1, 1, 0, 0]],
      e: [1],
      eLabels: ['sum'],
    };
    const ranges: [number, number][] = [[0.2, 0.3], [0.3, 0.4], [0.3, 0.5], [0, 1], [0.5, 2]];
    const out = regionProjections(region, ranges);
    expect(out).toHaveLength(10); // every pair of 5 unknowns
    const p01 = out.find((p) => p.i === 0 && p.j === 1)!;
    expect(p01.clipped).toBe(false);
    expect(p01.vertices).toHaveLength(3);
    for (const [x, y] of [[0, 0], [1, 0], [0, 1]]) expect(p01.vertices.some(([u, v]) => Math.abs(u - x) < 1e-9 && Math.abs(v - y) < 1e-9)).toBe(true);
    const pab = out.find((p) => p.i === 3 && p.j === 4)!;
    expect(pab.clipped).toBe(true);
    // a ≤ b inside the box [0 − 2, 1 + 2] × [0.5 − 3, 2 + 3]: every vertex keeps a ≤ b and stays in the box.
    for (const [x, y] of pab.vertices) {
      expect(x).toBeLessThanOrEqual(y + 1e-9);
      expect(x).toBeGreaterThanOrEqual(-2 - 1e-9);
      expect(y).toBeLessThanOrEqual(5 + 1e-9);
    }
  });
});
