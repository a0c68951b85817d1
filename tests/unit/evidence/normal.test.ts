/**
 * log Z of the conjugate normal model (known variance, normal prior) against its closed form
 * ("Bayesian Data Analysis", 3rd ed., ch. 2: the posterior of a normal mean with known variance, and
 * the marginal density of the data y ~ N(μ₀ 1, σ² I + τ² 1 1ᵀ)), without constraints and with a box
 * constraint a ≤ μ ≤ b, where Z_box = Z · P(a ≤ μ ≤ b | y) with the posterior normal CDF from
 * @stdlib/stats-base-dists-normal (reference library).
 *
 * Checks: |log Ẑ − log Z| ≤ 3 reported SE (replicates, fixed seeds); and the unconstrained case,
 * where the reference Gaussian is exact, to 1e-6.
 */
import { describe, expect, it } from 'vitest';
import normal from '@stdlib/stats-base-dists-normal';
import { programEvidence } from '../../../server/engine/evidence/program';
import type { DataTables } from '../../../server/engine/types';

const y = [2.1, 3.4, 1.7, 2.9, 4.2, 2.2, 3.1, 2.6, 3.8, 2.4];
const sigma = 2;
const mu0 = 1;
const tau = 3;
const tables: DataTables = { obs: { rows: y.length, columns: { y: { type: 'numeric', values: Float64Array.from(y) } } } };
const n = y.length;
const ybar = y.reduce((a, b) => a + b, 0) / n;
const prec = 1 / tau ** 2 + n / sigma ** 2;
const taun = Math.sqrt(1 / prec);
const mun = (mu0 / tau ** 2 + (n * ybar) / sigma ** 2) / prec;
const ss = y.reduce((a, v) => a + (v - ybar) ** 2, 0);
// log N(y; μ₀1, σ²I + τ²11ᵀ), factorised as in BDA ch. 2 (sufficient statistic ȳ).
const logZ =
  (-n / 2) * Math.log(2 * Math.PI * sigma ** 2) -
  ss / (2 * sigma ** 2) +
  Math.log(taun / tau) -
  (ybar - mu0) ** 2 / (2 * (tau ** 2 + sigma ** 2 / n));

function model(box?: [number, number]): string {
  return `table obs\nunknown mu\nterm ld_normal(y, mu, ${sigma})\nterm ld_normal(mu, ${mu0}, ${tau})\n` + (box ? `constrain ${box[0]} <= mu <= ${box[1]}\n` : '');
}

describe('log Z of the conjugate normal model', { timeout: 60_000 }, () => {
  it('without constraints equals the closed form (the Gaussian reference is exact)', () => {
    const r = programEvidence(model(), tables, { replicates: 4, seed: 21 });
    expect(r.reference).toBe('gaussian');
    expect(Math.abs(r.logZ - logZ)).toBeLessThan(1e-6); // BDA ch. 2 closed form
  });

  for (const box of [
    [0, 2.5],
    [3.3, 10],
    [-5, 5],
  ] as [number, number][]) {
    it(`with the box ${box[0]} ≤ mu ≤ ${box[1]}: Z · P(box | y) (normal CDF from @stdlib)`, () => {
      const truth = logZ + Math.log(normal.cdf(box[1], mun, taun) - normal.cdf(box[0], mun, taun));
      for (const reference of ['auto', 'uniform'] as const) {
        const r = programEvidence(model(box), tables, { replicates: 8, seed: 22, reference });
        expect(r.reference).toBe(reference === 'auto' ? 'gaussian' : 'uniform');
        expect(Math.abs(r.logZ - truth)).toBeLessThanOrEqual(3 * r.se);
      }
    });
  }

  it('a thin unbounded strip 0 ≤ a − b ≤ 0.01 under independent standard normals: Φ(0.01/√2) − ½ (a − b ~ N(0, 2); CDF from @stdlib)', () => {
    // A near-equality: the region is 100× narrower than the density across it and unbounded along it.
    const r = programEvidence('unknown a, b\nterm ld_normal(a, 0, 1) + ld_normal(b, 0, 1)\nconstrain 0 <= a - b <= 0.01\n', {}, { replicates: 8, seed: 24 });
    const truth = Math.log(normal.cdf(0.01 / Math.SQRT2, 0, 1) - 0.5);
    expect(r.reference).toBe('gaussian');
    expect(r.se).toBeLessThan(0.05);
    expect(Math.abs(r.logZ - truth)).toBeLessThanOrEqual(3 * r.se);
  });

  it('a 3-dimensional version: three independent means in a box (product of the 1-D answers)', () => {
    const src =
      'table obs\nunknown mu[3]\n' +
      `term ld_normal(y, mu[1], ${sigma}) + ld_normal(y, mu[2], ${sigma}) + ld_normal(y, mu[3], ${sigma})\n` +
      `term ld_normal(mu, ${mu0}, ${tau})\nconstrain 2 <= mu <= 3.5\n`;
    const one = logZ + Math.log(normal.cdf(3.5, mun, taun) - normal.cdf(2, mun, taun));
    const r = programEvidence(src, tables, { replicates: 8, seed: 23 });
    expect(Math.abs(r.logZ - 3 * one)).toBeLessThanOrEqual(3 * r.se);
    expect(r.volumeLog).not.toBeNull();
    expect(Math.abs(r.volumeLog! - 3 * Math.log(1.5))).toBeLessThanOrEqual(3 * r.volumeSe!); // box volume 1.5³
  });
});
