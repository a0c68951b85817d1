/**
 * Dikin walk ("Random walks on polytopes and an affine interior point method for linear
 * programming", Mathematics of Operations Research, 2012): at x the Dikin matrix of the log-barrier
 * H(x) = Aᵀ S(x)⁻² A + Λ defines the ellipsoid E_x = {y : (y − x)ᵀ H(x) (y − x) ≤ r²}; the proposal
 * is uniform in E_x, y = x + r L_x⁻ᵀ u with u uniform in the unit ball and H(x) = L_x L_xᵀ. Its
 * density is ∝ det H(x)^{1/2} on E_x, so the Metropolis–Hastings acceptance is
 *   min(1, π(y)/π(x) · √(det H(y) / det H(x)) · 1[x ∈ E_y])
 * (the ellipsoid-volume correction and the reverse-move indicator; π constant for a flat density).
 *
 * Λ is a fixed diagonal: the likelihood's curvature at the centre (so the ellipsoid also follows a
 * concentrated likelihood, and stays bounded on unbounded regions), floored at 10⁻⁶ of the barrier's
 * mean diagonal. Λ does not depend on the state, so the proposal stays a function of x alone. The
 * radius r (0.5 at first) is adapted in warm-up towards an acceptance of 0.5 (Robbins–Monro on log r,
 * common practice) and frozen for sampling. One kept draw = n proposals, like the other walks
 * (each proposal costs one Cholesky factorisation of an n × n matrix).
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import { isFlat } from '../geometry';
import type { Rng } from '../rng';
import { Cholesky } from '../linalg/cholesky';
import { curvatureDiagonal } from './rhmc';
import { adaptLogScale, runLoop, slacksOf, uniformInBall, type DrawCheck } from './common';

export const DIKIN_TARGET_ACCEPT = 0.5;

/** Λ of the Dikin walk: curvature of ℓ at the centre, floored relative to the barrier. */
export function dikinLambda(p: PreparedTarget, flat: boolean): Float64Array {
  const n = p.n;
  const s = new Float64Array(p.m);
  slacksOf(p, p.centre, s);
  const diag = new Float64Array(n);
  const { ptr, idx, val } = p.rows;
  for (let i = 0; i < p.m; i++) for (let q = ptr[i]; q < ptr[i + 1]; q++) diag[idx[q]] += (val[q] * val[q]) / (s[i] * s[i]);
  let mean = 0;
  for (let q = 0; q < n; q++) mean += diag[q] / n;
  const floor = p.m > 0 ? 1e-6 * Math.max(mean, 1e-12) : 1e-3;
  const lam = new Float64Array(n).fill(floor);
  if (!flat) {
    const curv = new Float64Array(n);
    const scale = new Float64Array(n).fill(1 / Math.sqrt(Math.max(mean, 1e-12)));
    curvatureDiagonal(p, p.centre, scale, curv);
    for (let q = 0; q < n; q++) lam[q] = Math.max(curv[q], floor);
  }
  return lam;
}

export function dikinWalkChain(p: PreparedTarget, start: Float64Array, opts: ChainOptions, rng: Rng, check: DrawCheck): ChainOutput {
  const n = p.n;
  const m = p.m;
  const flat = isFlat(p);
  const lam = dikinLambda(p, flat);
  const G = new Float64Array(n * n);
  const w = new Float64Array(m);
  let cholX = new Cholesky(n);
  let cholY = new Cholesky(n);
  const x = Float64Array.from(start);
  const sx = new Float64Array(m);
  const sy = new Float64Array(m);
  const y = new Float64Array(n);
  const u = new Float64Array(n);
  const d = new Float64Array(n);
  const Ad = new Float64Array(m);
  const grad = new Float64Array(n);
  const factorAt = (s: Float64Array, ch: Cholesky): boolean => {
    for (let i = 0; i < m; i++) w[i] = 1 / (s[i] * s[i]);
    p.rows.gram(w, lam, G);
    return ch.factor(G);
  };
  if (!slacksOf(p, x, sx)) throw new Error('Dikin walk: the start is not strictly inside the region');
  if (!factorAt(sx, cholX)) throw new Error('Dikin walk: the Dikin matrix is singular at the start');
  let ldX = cholX.logDet();
  let lX = flat ? 0 : p.logDensity(x, grad);
  let logR = Math.log(0.5);
  let adaptCount = 0;
  let proposals = 0;
  let gramCost = 0;
  for (let i = 0; i < m; i++) gramCost += (p.rows.ptr[i + 1] - p.rows.ptr[i]) ** 2;
  const moves = Math.max(1, n);
  const perProposal = (n * n * n) / 3 + gramCost + 2 * n * n + 8 * p.rows.val.length + 4 * m;
  return runLoop(p, opts, check, {
    z: x,
    iterate(warm) {
      let acc = 0;
      for (let k = 0; k < moves; k++) acc += propose(warm);
      return { accept: acc / moves };
    },
    endWarmup() {
      slacksOf(p, x, sx);
      factorAt(sx, cholX);
      ldX = cholX.logDet();
    },
    stepSize: () => Math.exp(logR),
    work: () => proposals * perProposal,
  });
  function propose(warm: boolean): number {
      proposals++;
      const r = Math.exp(logR);
      uniformInBall(rng, u);
      cholX.backward(u, d);
      for (let q = 0; q < n; q++) d[q] *= r;
      p.rows.mul(d, Ad);
      let a = 0;
      for (let q = 0; q < n; q++) y[q] = x[q] + d[q];
      if (slacksOf(p, y, sy)) {
        // Reverse move possible? (x − y)ᵀ H(y) (x − y) = Σ (aᵢ·d)²/s_y,ᵢ² + Σ Λ d² ≤ r².
        let quad = 0;
        for (let i = 0; i < m; i++) quad += (Ad[i] * Ad[i]) / (sy[i] * sy[i]);
        for (let q = 0; q < n; q++) quad += lam[q] * d[q] * d[q];
        if (quad <= r * r && factorAt(sy, cholY)) {
          const ldY = cholY.logDet();
          let lY = 0;
          if (!flat) {
            lY = p.logDensity(y, grad);
            if (Number.isNaN(lY)) lY = -Infinity;
          }
          const logA = lY - lX + 0.5 * (ldY - ldX);
          a = logA >= 0 ? 1 : Math.exp(logA);
          if (rng.uniform() < a) {
            x.set(y);
            sx.set(sy);
            const t = cholX;
            cholX = cholY;
            cholY = t;
            ldX = ldY;
            lX = lY;
          }
        }
      }
      if (warm) logR = adaptLogScale(logR, a, DIKIN_TARGET_ACCEPT, adaptCount++);
      return a;
  }
}
