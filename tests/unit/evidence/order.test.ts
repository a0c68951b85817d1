/**
 * Order hypotheses on exchangeable means.
 *
 * - Prior mass of a full ordering μ₁ ≤ … ≤ μ_k under an exchangeable prior (iid normal) is 1/k!: all
 *   k! orderings are equally likely by symmetry (common practice). Computed as a mass by annealing:
 *   Z(prior on the ordered cone) / Z(prior on R^k), for k = 3, 6 and 10 (1/10! ≈ 2.8e-7, far too small
 *   to count draws).
 * - The Bayes factor of the ordering with normal data of known variance (encompassing-prior identity,
 *   Psychological Methods 10, 2005: BF = posterior mass / prior mass) against a Monte Carlo reference
 *   computed here from the independent normal posteriors of the means (conjugate normal updates,
 *   "Bayesian Data Analysis", 3rd ed., ch. 2): the posterior mass is the share of independent
 *   posterior draws that are ordered.
 *
 * Tolerances: 3 reported SE (replicates; for the Monte Carlo reference its binomial SE is added in
 * quadrature), fixed seeds.
 */
import { describe, expect, it } from 'vitest';
import { programEvidence, testHypothesis } from '../../../server/engine/evidence/program';
import { Rng } from '../../../server/engine/rng';
import type { DataTables } from '../../../server/engine/types';

function logFactorial(k: number): number {
  let s = 0;
  for (let i = 2; i <= k; i++) s += Math.log(i);
  return s;
}

describe('prior mass of a full ordering of exchangeable means', { timeout: 120_000 }, () => {
  for (const k of [3, 6, 10]) {
    it(`k = ${k}: 1/k! (symmetry, common practice)`, () => {
      // The prior ld_normal is normalised, so Z on R^k is 1 and Z on the cone is the mass itself.
      const free = programEvidence(`unknown mu[${k}]\nterm ld_normal(mu, 2, 3)\n`, {}, { replicates: 4, seed: 30 + k });
      expect(Math.abs(free.logZ)).toBeLessThan(1e-6); // a normalised density integrates to 1
      const cone = programEvidence(`unknown mu[${k}]\nterm ld_normal(mu, 2, 3)\nconstrain diff(mu) >= 0\n`, {}, { replicates: 8, seed: 40 + k });
      const logMass = cone.logZ - free.logZ;
      expect(cone.se).toBeLessThan(0.1); // precise enough for the check to mean something
      expect(Math.abs(logMass + logFactorial(k))).toBeLessThanOrEqual(3 * Math.hypot(cone.se, free.se));
    });
  }
});

describe('Bayes factor of an order hypothesis on normal means (known variance)', { timeout: 120_000 }, () => {
  it('matches a Monte Carlo reference from the independent normal posteriors', () => {
    const k = 4;
    const per = 6;
    const sigma = 1.5;
    const tau = 2;
    const rng = new Rng(2024, 1);
    const y: number[] = [];
    const g: number[] = [];
    for (let j = 0; j < k; j++) for (let i = 0; i < per; i++) {
      y.push(0.3 * j + sigma * rng.normal());
      g.push(j + 1);
    }
    const tables: DataTables = {
      d: {
        rows: y.length,
        columns: {
          y: { type: 'numeric', values: Float64Array.from(y) },
          g: { type: 'category', values: Float64Array.from(g), levels: ['a', 'b', 'c', 'd'] },
        },
      },
    };
    const src = `table d\nunknown mu[${k}]\nterm ld_normal(y, mu[g], ${sigma})\nterm ld_normal(mu, 0, ${tau})\nconstrain mu[1] <= mu[2] <= mu[3] <= mu[4]\n`;
    const h = testHypothesis(src, tables, [5], { replicates: 8, seed: 50 });
    expect(h.likelihoodLines).toEqual([3]);
    // Prior mass 1/4! by symmetry (common practice).
    expect(Math.abs(h.prior.log + logFactorial(k))).toBeLessThanOrEqual(3 * h.prior.se);

    // Monte Carlo reference: μⱼ | y ~ N(mⱼ, sⱼ²) independently, precision 1/τ² + nⱼ/σ² (BDA ch. 2).
    const post = Array.from({ length: k }, (_, j) => {
      const ys = y.filter((_, i) => g[i] === j + 1);
      const precJ = 1 / tau ** 2 + ys.length / sigma ** 2;
      return { m: ys.reduce((a, b) => a + b, 0) / sigma ** 2 / precJ, s: 1 / Math.sqrt(precJ) };
    });
    const mc = new Rng(77, 2);
    const M = 400_000;
    let hits = 0;
    for (let s = 0; s < M; s++) {
      let prev = -Infinity;
      let ok = true;
      for (const p of post) {
        const v = p.m + p.s * mc.normal();
        if (v < prev) {
          ok = false;
          break;
        }
        prev = v;
      }
      if (ok) hits++;
    }
    const pHat = hits / M;
    const mcSeLog = Math.sqrt((1 - pHat) / (pHat * M)); // delta method on log of a binomial share
    const logBfRef = Math.log(pHat) + logFactorial(k);
    expect(Math.abs(h.posterior.log - Math.log(pHat))).toBeLessThanOrEqual(3 * Math.hypot(h.posterior.se, mcSeLog));
    expect(Math.abs(h.logBF - logBfRef)).toBeLessThanOrEqual(3 * Math.hypot(h.se, mcSeLog));
  });
});
