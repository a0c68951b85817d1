/**
 * The barrier-metric Hamiltonian's gradients against finite differences, and the integrator's
 * reversibility and near-conservation of energy.
 */
import { describe, expect, it } from 'vitest';
import { prepareTarget } from '../../../server/engine/geometry';
import { BarrierIntegrator, PointState } from '../../../server/engine/samplers/rhmc';
import { Rng } from '../../../server/engine/rng';
import { gaussianOnSimplexTarget, orderSimplexTarget, truncatedNormalTarget } from './targets';

const targets = [
  ['Gaussian on the 4-simplex', gaussianOnSimplexTarget({ d: 4, centre: 0.15, sd: 0.2 })],
  ['order simplex n = 5', orderSimplexTarget(5)],
  ['normal truncated to [-1, 1]', truncatedNormalTarget({ lo: -1, hi: 1 })],
] as const;

describe.each(targets)('barrier Hamiltonian on %s', (_name, target) => {
  const p = prepareTarget(target);
  const n = p.n;
  const rng = new Rng(17);
  const lambda = Float64Array.from({ length: n }, () => 0.3 + rng.uniform());
  const integ = new BarrierIntegrator(p, lambda);
  const point = (z: Float64Array) => {
    const ps = new PointState(n, p.m);
    ps.z.set(z);
    expect(integ.evaluate(ps)).toBe('ok');
    return ps;
  };
  // an interior point away from the centre, and a momentum
  const z0 = Float64Array.from(p.centre, (c, q) => c + 0.02 * (q % 2 ? 1 : -1));
  const pm = Float64Array.from({ length: n }, () => 3 * rng.normal());

  it('∇_z H matches central finite differences of H (common practice: h = 1e-6, relative error < 1e-5)', () => {
    const ps = point(z0);
    const v = new Float64Array(n);
    integ.energy(ps, pm, v);
    const grad = integ.gradH(ps, v, new Float64Array(n));
    for (let k = 0; k < n; k++) {
      const h = 1e-6;
      const zp = Float64Array.from(z0);
      zp[k] += h;
      const zm = Float64Array.from(z0);
      zm[k] -= h;
      const fd = (integ.energy(point(zp), pm) - integ.energy(point(zm), pm)) / (2 * h);
      expect(Math.abs(fd - grad[k])).toBeLessThan(1e-5 * (1 + Math.abs(grad[k])));
    }
  });

  it('∂H/∂p = g⁻¹ p matches finite differences', () => {
    const ps = point(z0);
    const v = new Float64Array(n);
    integ.energy(ps, pm, v);
    for (let k = 0; k < n; k++) {
      const h = 1e-6;
      const pp = Float64Array.from(pm);
      pp[k] += h;
      const pq = Float64Array.from(pm);
      pq[k] -= h;
      const fd = (integ.energy(ps, pp) - integ.energy(ps, pq)) / (2 * h);
      expect(Math.abs(fd - v[k])).toBeLessThan(1e-6 * (1 + Math.abs(v[k])));
    }
  });

  it('the integrator is reversible: 10 steps forward, flip momentum, 10 back returns to the start', () => {
    const eps = 0.05;
    let cur = point(p.centre);
    let next = new PointState(n, p.m);
    const mom = Float64Array.from({ length: n }, () => rng.normal());
    const L = cur.chol.L;
    // momentum ~ N(0, g): p = L ξ
    const pStart = new Float64Array(n);
    for (let i = 0; i < n; i++) for (let k = 0; k <= i; k++) pStart[i] += L[i * n + k] * mom[k];
    const pmv = Float64Array.from(pStart);
    const h0 = integ.energy(cur, pmv);
    for (let s = 0; s < 10; s++) {
      expect(integ.step(cur, next, pmv, eps)).toBe('ok');
      [cur, next] = [next, cur];
    }
    const h1 = integ.energy(cur, pmv);
    expect(Math.abs(h1 - h0)).toBeLessThan(0.1);
    for (let q = 0; q < n; q++) pmv[q] = -pmv[q];
    for (let s = 0; s < 10; s++) {
      expect(integ.step(cur, next, pmv, eps)).toBe('ok');
      [cur, next] = [next, cur];
    }
    for (let q = 0; q < n; q++) {
      expect(Math.abs(cur.z[q] - p.centre[q])).toBeLessThan(1e-8);
      expect(Math.abs(-pmv[q] - pStart[q])).toBeLessThan(1e-7 * (1 + Math.abs(pStart[q])));
    }
  });
});
