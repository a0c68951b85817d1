/**
 * Volumes of polytopes by Gaussian cooling (server/engine/evidence), against standard formulas:
 * the unit cube has volume 1, the standard simplex {x ≥ 0, Σx ≤ 1} in R^d has 1/d!, the
 * cross-polytope {Σ|xⱼ| ≤ 1} has 2^d/d!, a box has the product of its sides, and the probability
 * simplex {x ≥ 0, Σx = 1} in R^d has (d−1)-dimensional Euclidean volume √d/(d−1)! (all standard
 * formulas of elementary geometry, common practice).
 *
 * Each check: |log V̂ − log V| ≤ 3 reported SE (SE from independent replicates, fixed seeds) and the
 * relative error |V̂/V − 1| ≤ 5 %.
 */
import { describe, expect, it } from 'vitest';
import { prepareTarget } from '../../../server/engine/geometry';
import { computeVolume, type EvidenceResult } from '../../../server/engine/evidence';
import { compileProgram } from '../../../server/engine/compile';
import { box, crossPolytope, simplex } from './targets';

function logFactorial(d: number): number {
  let s = 0;
  for (let i = 2; i <= d; i++) s += Math.log(i);
  return s;
}

function expectVolume(r: EvidenceResult, logTruth: number): void {
  expect(r.volumeLog).not.toBeNull();
  const err = r.volumeLog! - logTruth;
  expect(r.volumeSe!).toBeGreaterThan(0);
  expect(Math.abs(err)).toBeLessThanOrEqual(3 * r.volumeSe!);
  expect(Math.abs(Math.expm1(err))).toBeLessThanOrEqual(0.05);
}

describe('volumes by Gaussian cooling', { timeout: 120_000 }, () => {
  it('unit cube, d = 5: volume 1 (standard formula)', () => {
    const r = computeVolume(prepareTarget(box(new Array(5).fill(1))), { replicates: 8, seed: 11 });
    expectVolume(r, 0);
    expect(r.reference).toBe('volume');
  });

  it('unit cube, d = 20: volume 1 (standard formula)', () => {
    const r = computeVolume(prepareTarget(box(new Array(20).fill(1))), { replicates: 8, seed: 12 });
    expectVolume(r, 0);
  });

  it('standard simplex, d = 8: volume 1/d! (standard formula)', () => {
    const r = computeVolume(prepareTarget(simplex(8)), { replicates: 8, seed: 13 });
    expectVolume(r, -logFactorial(8));
  });

  it('cross-polytope, d = 6: volume 2^d/d! (standard formula)', () => {
    const r = computeVolume(prepareTarget(crossPolytope(6)), { replicates: 8, seed: 14 });
    expectVolume(r, 6 * Math.log(2) - logFactorial(6));
  });

  it('a box with one side 1000× longer: the product of the sides (standard formula)', () => {
    const r = computeVolume(prepareTarget(box([1, 1000, 1, 1])), { replicates: 8, seed: 15 });
    expectVolume(r, Math.log(1000));
  });

  it('a model with no term lines: the volume of its region; with an equality, the Euclidean measure on the subspace', () => {
    // Probability simplex in R^4: (d−1)-volume √d/(d−1)! (standard formula). The model has no term
    // lines, so its log Z is its log volume.
    const model = compileProgram('unknown w[4]\nconstrain w >= 0\nconstrain sum(w) == 1\n', {});
    const p = prepareTarget(model);
    expect(p.n).toBe(3);
    const r = computeVolume(p, { replicates: 8, seed: 16 });
    expectVolume(r, 0.5 * Math.log(4) - logFactorial(3));
  });

  it('refuses an unbounded region', () => {
    const model = compileProgram('unknown a, b\nconstrain a >= 0\nconstrain b >= a\n', {});
    expect(() => computeVolume(prepareTarget(model))).toThrow(/unbounded/);
  });
});
