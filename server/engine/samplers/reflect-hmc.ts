/**
 * Euclidean HMC that reflects off the faces of the region ("MCMC using Hamiltonian dynamics",
 * Handbook of Markov Chain Monte Carlo, 2011, §5.1 on constraints; "Exact Hamiltonian Monte Carlo
 * for truncated multivariate Gaussians", Journal of Computational and Graphical Statistics, 2014;
 * "Reflection, refraction, and Hamiltonian Monte Carlo", NeurIPS, 2015). The state is the region's
 * reduced coordinates z; ℓ is defined only inside {A z ≤ b}.
 *
 * Drift of a leapfrog step (time ε, velocity v = M⁻¹p): the first face aᵢ·z = bᵢ hit within the
 * remaining time is found exactly from the slacks (tᵢ = sᵢ / (aᵢ·v) over rows with aᵢ·v > 0); the
 * point moves to it and the momentum is reflected in the metric,
 *   p ← p − 2 (aᵢ·M⁻¹p) / (aᵢ·M⁻¹aᵢ) aᵢ,
 * which keeps ½pᵀM⁻¹p and reverses aᵢ·v; the drift goes on for the time left. The reflected drift
 * is volume-preserving and reversible (run from the end with −p it retraces the path), so the
 * leapfrog with reflections is a valid Metropolis proposal. A drift with more than 100 + 10·m
 * reflections, or whose end point round-off puts outside the region, rejects the trajectory
 * (counted as rejected, not as a divergence). Metric, step size and path length: hmc-core.ts.
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import type { Rng } from '../rng';
import { nnz, slacksOf, type DrawCheck } from './common';
import { euclideanHmcChain, HMC_TRAJECTORY_TIME } from './hmc-core';
import { isFlat } from '../geometry';
import { curvatureDiagonal } from './rhmc';

export function reflectHmcChain(p: PreparedTarget, start: Float64Array, opts: ChainOptions, rng: Rng, check: DrawCheck): ChainOutput {
  const n = p.n;
  const m = p.m;
  const s = new Float64Array(m);
  if (!slacksOf(p, start, s)) throw new Error('reflective HMC: the start is not strictly inside the region');
  const v = new Float64Array(n);
  const Av = new Float64Array(m);
  const aNorm = new Float64Array(m);
  const { ptr, idx, val } = p.rows;
  const maxReflections = 100 + 10 * m;
  let reflections = 0;
  let drifts = 0;
  // Initial inverse metric: the barrier's diagonal plus the likelihood's curvature at the start.
  const invM0 = new Float64Array(n);
  {
    const diag = new Float64Array(n);
    for (let i = 0; i < m; i++) for (let q = ptr[i]; q < ptr[i + 1]; q++) diag[idx[q]] += (val[q] * val[q]) / (s[i] * s[i]);
    let mean = 0;
    for (let q = 0; q < n; q++) mean += diag[q] / n;
    const curv = new Float64Array(n);
    const scale = new Float64Array(n).fill(m > 0 ? 1 / Math.sqrt(Math.max(mean, 1e-12)) : 1);
    curvatureDiagonal(p, start, scale, curv);
    for (let q = 0; q < n; q++) {
      const h = diag[q] + curv[q];
      invM0[q] = h > 0 && Number.isFinite(h) ? 1 / h : 1;
    }
  }
  const drift = (z: Float64Array, pm: Float64Array, invM: Float64Array, t: number): boolean => {
    drifts++;
    if (!slacksOf(p, z, s)) return false;
    for (let i = 0; i < m; i++) {
      let a2 = 0;
      for (let q = ptr[i]; q < ptr[i + 1]; q++) a2 += val[q] * val[q] * invM[idx[q]];
      aNorm[i] = a2;
    }
    let left = t;
    for (let r = 0; ; r++) {
      if (r > maxReflections) return false;
      for (let q = 0; q < n; q++) v[q] = invM[q] * pm[q];
      p.rows.mul(v, Av);
      let tHit = Infinity;
      let iHit = -1;
      for (let i = 0; i < m; i++) {
        if (Av[i] > 0) {
          const ti = Math.max(0, s[i]) / Av[i];
          if (ti < tHit) {
            tHit = ti;
            iHit = i;
          }
        }
      }
      if (tHit >= left) {
        for (let q = 0; q < n; q++) z[q] += left * v[q];
        break;
      }
      for (let q = 0; q < n; q++) z[q] += tHit * v[q];
      for (let i = 0; i < m; i++) s[i] -= tHit * Av[i];
      s[iHit] = 0;
      left -= tHit;
      const c = (2 * Av[iHit]) / aNorm[iHit];
      for (let q = ptr[iHit]; q < ptr[iHit + 1]; q++) pm[idx[q]] -= c * val[q];
      reflections++;
    }
    return slacksOf(p, z, s);
  };
  return euclideanHmcChain(
    p,
    {
      k: n,
      x0: start,
      logDensity: (z, g) => p.logDensity(z, g),
      drift,
      toZ: (x, z) => z.set(x),
      invMetric0: invM0,
      trajectoryTime: isFlat(p) ? 8 : HMC_TRAJECTORY_TIME,
      driftWork: () => drifts * (4 * nnz(p) + 3 * m) + reflections * (2 * nnz(p) + 2 * m + 2 * n),
    },
    opts,
    rng,
    check,
  );
}
