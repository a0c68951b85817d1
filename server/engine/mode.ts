/**
 * Maximum a posteriori by an interior-point (barrier) Newton method ("Convex Optimization",
 * Cambridge University Press 2004, §11.3): minimise f_μ(z) = −ℓ(z) − μ Σ log(bᵢ − aᵢ z) for μ = 1, 0.1, 0.01, … down to
 * m·μ ≤ 1e-11·(1 + |ℓ|), each stage by damped Newton from the previous stage's point.
 * ∇²ℓ comes from central differences of the gradient (2n gradient evaluations per Newton step), with
 * Levenberg damping when −∇²ℓ is not positive definite. Starts at the analytic centre.
 */
import type { PreparedTarget } from './geometry';
import { assertFiniteStart } from './geometry';
import { Cholesky } from './linalg/cholesky';

export function findMode(
  p: PreparedTarget,
  opts: { lastMu?: number; maxIterations?: number; hessianEvery?: number } = {},
): {
  theta: Float64Array;
  /** The same point in the reduced coordinates. */
  z: Float64Array;
  /** Cholesky factor of the last Newton step's matrix (−∇²ℓ plus the barrier's Hessian, damped if needed). */
  factor: Cholesky;
  logDensity: number;
  iterations: number;
  converged: boolean;
} {
  const maxIterations = opts.maxIterations ?? 100;
  const hessianEvery = opts.hessianEvery ?? 1;
  const { n, m, rows, b } = p;
  const z = Float64Array.from(p.centre);
  const g = new Float64Array(n);
  let l = p.logDensity(z, g);
  assertFiniteStart(p, l, z);
  const s = new Float64Array(m);
  const inv = new Float64Array(m);
  const H = new Float64Array(n * n);
  const Hb = new Float64Array(n * n);
  const grad = new Float64Array(n);
  const dz = new Float64Array(n);
  const zt = new Float64Array(n);
  const gt = new Float64Array(n);
  const g1 = new Float64Array(n);
  const g2 = new Float64Array(n);
  const chol = new Cholesky(n);

  const slacks = (zz: Float64Array): boolean => {
    rows.mul(zz, s);
    for (let i = 0; i < m; i++) {
      s[i] = b[i] - s[i];
      if (!(s[i] > 0)) return false;
    }
    return true;
  };
  const f = (zz: Float64Array, mu: number, gg: Float64Array): number => {
    if (!slacks(zz)) return Infinity;
    const ll = p.logDensity(zz, gg);
    if (!Number.isFinite(ll)) return Infinity;
    let v = -ll;
    for (let i = 0; i < m; i++) v -= mu * Math.log(s[i]);
    return v;
  };

  let iterations = 0;
  let mu = m > 0 ? 1 : 0;
  let converged = false;
  for (let stage = 0; stage < 40; stage++) {
    let stageConverged = false;
    for (let it = 0; it < maxIterations; it++) {
      iterations++;
      const fz = f(z, mu, g);
      // gradient of f
      for (let i = 0; i < m; i++) inv[i] = mu / s[i];
      for (let q = 0; q < n; q++) grad[q] = -g[q];
      rows.addMulT(inv, grad, 1);
      // Hessian of −ℓ by central differences, limited to stay inside the region
      const colMax = new Float64Array(n).fill(Infinity);
      for (let i = 0; i < m; i++)
        for (let q = rows.ptr[i]; q < rows.ptr[i + 1]; q++)
          colMax[rows.idx[q]] = Math.min(colMax[rows.idx[q]], (0.25 * s[i]) / Math.abs(rows.val[q]));
      for (let j = 0; j < n && it % hessianEvery === 0; j++) {
        const h = Math.min(1e-5 * Math.max(1, Math.abs(z[j])), colMax[j]);
        zt.set(z);
        zt[j] = z[j] + h;
        p.logDensity(zt, g1);
        zt[j] = z[j] - h;
        p.logDensity(zt, g2);
        for (let q = 0; q < n; q++) H[q * n + j] = -(g1[q] - g2[q]) / (2 * h);
      }
      for (let i = 0; i < n && it % hessianEvery === 0; i++)
        for (let j = 0; j < i; j++) {
          const a = 0.5 * (H[i * n + j] + H[j * n + i]);
          H[i * n + j] = a;
          H[j * n + i] = a;
        }
      for (let i = 0; i < m; i++) inv[i] = mu / (s[i] * s[i]);
      rows.gram(inv, null, Hb);
      for (let k = 0; k < n * n; k++) Hb[k] += H[k];
      let damp = 0;
      let diagMax = 0;
      for (let q = 0; q < n; q++) diagMax = Math.max(diagMax, Math.abs(Hb[q * n + q]));
      while (!chol.factor(Hb)) {
        const add = damp === 0 ? 1e-10 * Math.max(1, diagMax) : damp * 9;
        for (let q = 0; q < n; q++) Hb[q * n + q] += add;
        damp = damp === 0 ? add : damp + add;
        if (damp > 1e12 * Math.max(1, diagMax)) break;
      }
      chol.solve(grad, dz);
      let dec = 0;
      for (let q = 0; q < n; q++) dec += grad[q] * dz[q];
      if (!Number.isFinite(dec)) break;
      if (dec / 2 <= 1e-12 * (1 + Math.abs(fz))) {
        stageConverged = true;
        break;
      }
      let step = 1;
      let moved = false;
      for (let ls = 0; ls < 60; ls++) {
        for (let q = 0; q < n; q++) zt[q] = z[q] - step * dz[q];
        const ft = f(zt, mu, gt);
        if (ft <= fz - 0.25 * step * dec) {
          z.set(zt);
          moved = true;
          break;
        }
        step *= 0.5;
      }
      if (!moved) {
        stageConverged = dec / 2 <= 1e-8 * (1 + Math.abs(fz));
        break;
      }
    }
    l = p.logDensity(z, g);
    if (m === 0 || mu * m <= 1e-11 * (1 + Math.abs(l)) || (opts.lastMu !== undefined && mu <= opts.lastMu)) {
      converged = stageConverged;
      break;
    }
    mu *= 0.1;
  }
  const theta = new Float64Array(p.target.dim);
  p.toTheta(z, theta);
  return { theta, z, factor: chol, logDensity: l, iterations, converged };
}

/**
 * A point in the bulk of the posterior: the first barrier stage only (μ = 1), i.e. the mode of the
 * density times Πᵢ sᵢ. Where the density presses on a face with rate λ (log-density ≈ −λ·slack
 * near it) this stage's slack is 1/λ, the mean slack under the density itself, so the point sits
 * in the mass rather than on the face the exact mode lies on; a few damped Newton steps suffice
 * (maxIterations; a point near the stage's optimum is enough). Used to start the automatic choice's pilot chains.
 */
export function bulkPoint(p: PreparedTarget, maxIterations = 10): Float64Array {
  return bulkApproximation(p, maxIterations).z;
}

/**
 * The bulk point and the Cholesky factor of the curvature there (−∇²ℓ plus the barrier's Hessian):
 * a Gaussian approximation N(z, (LLᵀ)⁻¹) of the posterior that stays inside the region near faces.
 * The likelihood's Hessian (2n evaluations) is refreshed every third Newton step; the barrier's
 * part is exact.
 */
export function bulkApproximation(p: PreparedTarget, maxIterations = 10): { z: Float64Array; factor: Cholesky } {
  const r = findMode(p, { lastMu: 1, maxIterations, hessianEvery: 3 });
  return { z: r.z, factor: r.factor };
}
