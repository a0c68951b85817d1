/**
 * Volume of a body given by a chord oracle (server/engine/evidence computeOracleVolume, anneal.ts
 * l1BallOracle): the cross-polytope {Σ|xⱼ| ≤ r} in R^d has volume (2r)^d/d! (standard formula of
 * elementary geometry, common practice), here at d = 8 with r = 1 and r = 2, and agrees with the
 * rows-based estimate of the same body at d = 6. Checks: |log V̂ − log V| ≤ 4 reported SE (independent
 * replicates, fixed seeds).
 */
import { describe, expect, it } from 'vitest';
import { computeOracleVolume, computeVolume, l1BallOracle } from '../../../server/engine/evidence';
import { prepareTarget } from '../../../server/engine/geometry';
import { crossPolytope } from './targets';

const logFactorial = (d: number) => Array.from({ length: d }, (_, i) => Math.log(i + 1)).reduce((a, b) => a + b, 0);

describe('volume of an oracle body', { timeout: 60_000 }, () => {
  for (const r of [1, 2]) {
    it(`the ℓ1 ball of radius ${r} in R^8: (2r)^8/8!`, () => {
      const v = computeOracleVolume(8, l1BallOracle(8, r), { replicates: 6, seed: 21 });
      const truth = 8 * Math.log(2 * r) - logFactorial(8);
      expect(Math.abs(v.volumeLog! - truth)).toBeLessThanOrEqual(4 * v.volumeSe!);
    });
  }

  it('agrees with the rows (2^6 of them) at d = 6', () => {
    const a = computeOracleVolume(6, l1BallOracle(6, 1), { replicates: 6, seed: 5 });
    const b = computeVolume(prepareTarget(crossPolytope(6)), { replicates: 6, seed: 6 });
    expect(Math.abs(a.volumeLog! - b.volumeLog!)).toBeLessThanOrEqual(4 * Math.hypot(a.volumeSe!, b.volumeSe!));
  });
});
