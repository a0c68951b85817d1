/**
 * Random-walk Metropolis with an adapted Gaussian proposal ("An adaptive Metropolis algorithm",
 * Bernoulli, 2001; the scale 2.38/√n from "Weak convergence and optimal scaling of random walk
 * Metropolis algorithms", Annals of Applied Probability, 1997): y = z + c L ξ, ξ ~ N(0, I), with
 * L Lᵀ = Σ. A y outside the region has density zero and is rejected; otherwise y is accepted with
 * probability min(1, π(y)/π(z)).
 *
 * Warm-up: Σ starts as the inverse Dikin matrix at the centre and is replaced at the end of each
 * slow window (the same window plan as the HMC engines, samplers/adapt.ts) by the window's sample
 * covariance, shrunk towards the previous proposal covariance with weight n/(k + n) for a window
 * of k iterations (a short window in many dimensions is singular); c starts at 2.38/√n and follows
 * a Robbins–Monro update towards an acceptance of 0.234 through the whole warm-up. Both are frozen for
 * sampling, so the kept chain is a plain Metropolis chain. One kept draw = n proposals.
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import { isFlat } from '../geometry';
import type { Rng } from '../rng';
import { Cholesky } from '../linalg/cholesky';
import { warmupBuffers, windowEnds } from './adapt';
import { adaptLogScale, nnz, runLoop, slacksOf, type DrawCheck } from './common';

export const RWM_TARGET_ACCEPT = 0.234;

export function rwmChain(p: PreparedTarget, start: Float64Array, opts: ChainOptions, rng: Rng, check: DrawCheck): ChainOutput {
  const n = p.n;
  const m = p.m;
  const flat = isFlat(p);
  const z = Float64Array.from(start);
  const s = new Float64Array(m);
  if (!slacksOf(p, z, s)) throw new Error('random-walk Metropolis: the start is not strictly inside the region');
  const grad = new Float64Array(n);
  let l = flat ? 0 : p.logDensity(z, grad);
  // Proposal factor: lower triangular L (row-major); first the inverse Dikin matrix's factor
  // L⁻ᵀ, applied by back substitution, then a Cholesky factor of the adapted covariance.
  let L: Float64Array | null = null;
  const chol = new Cholesky(n);
  let logC = Math.log(2.38 / Math.sqrt(n));
  let adaptCount = 0;
  const xi = new Float64Array(n);
  const d = new Float64Array(n);
  const Ad = new Float64Array(m);
  const y = new Float64Array(n);
  const ends = windowEnds(opts.warmup);
  const initBuf = warmupBuffers(opts.warmup).init;
  const wMean = new Float64Array(n);
  const wM2 = new Float64Array(n * n);
  const dev = new Float64Array(n);
  let wCount = 0;
  let proposals = 0;
  const perProposal = 2 * nnz(p) + 2 * m + n * n + 6 * n;
  let work = 0;
  const propose = (warm: boolean): number => {
    proposals++;
    rng.normals(xi);
    const c = Math.exp(logC);
    if (L) {
      for (let i = n - 1; i >= 0; i--) {
        let sum = 0;
        for (let k = 0; k <= i; k++) sum += L[i * n + k] * xi[k];
        d[i] = c * sum;
      }
    } else {
      const dl = p.dikinL;
      d.set(xi);
      for (let i = n - 1; i >= 0; i--) {
        const v = d[i] / dl[i * n + i];
        d[i] = v;
        for (let k = 0; k < i; k++) d[k] -= dl[i * n + k] * v;
      }
      for (let q = 0; q < n; q++) d[q] *= c;
    }
    p.rows.mul(d, Ad);
    let a = 0;
    let inside = true;
    for (let i = 0; i < m; i++)
      if (!(s[i] - Ad[i] > 0)) {
        inside = false;
        break;
      }
    if (inside) {
      for (let q = 0; q < n; q++) y[q] = z[q] + d[q];
      let ly = 0;
      if (!flat) {
        ly = p.logDensity(y, grad);
        if (Number.isNaN(ly)) ly = -Infinity;
      }
      a = ly >= l ? 1 : Math.exp(ly - l);
      if (a >= 1 || rng.uniform() < a) {
        z.set(y);
        for (let i = 0; i < m; i++) s[i] -= Ad[i];
        l = ly;
      }
    }
    if (warm) logC = adaptLogScale(logC, a, RWM_TARGET_ACCEPT, adaptCount++);
    return a;
  };
  /** Σ of the current proposal (without c): L Lᵀ, or H⁻¹ = L_H⁻ᵀ L_H⁻¹ from the Dikin factor. */
  const currentCovariance = (): Float64Array => {
    const S = new Float64Array(n * n);
    if (L) {
      for (let q = 0; q < n; q++)
        for (let r = 0; r <= q; r++) {
          let v = 0;
          for (let t = 0; t <= r; t++) v += L[q * n + t] * L[r * n + t];
          S[q * n + r] = v;
          S[r * n + q] = v;
        }
      return S;
    }
    // Columns of L_H⁻ᵀ: back substitution of unit vectors; H⁻¹ = Σ_t col_t col_tᵀ.
    const col = new Float64Array(n);
    const dl = p.dikinL;
    for (let t = 0; t < n; t++) {
      col.fill(0);
      col[t] = 1;
      for (let i = n - 1; i >= 0; i--) {
        const v = col[i] / dl[i * n + i];
        col[i] = v;
        for (let kk = 0; kk < i; kk++) col[kk] -= dl[i * n + kk] * v;
      }
      for (let q = 0; q < n; q++) for (let r = 0; r < n; r++) S[q * n + r] += col[q] * col[r];
    }
    return S;
  };
  const moves = Math.max(1, n);
  return runLoop(p, opts, check, {
    z,
    iterate(warm, it) {
      slacksOf(p, z, s);
      let acc = 0;
      for (let k = 0; k < moves; k++) acc += propose(warm);
      if (warm && it >= initBuf && ends.size > 0) {
        wCount++;
        for (let q = 0; q < n; q++) {
          dev[q] = z[q] - wMean[q];
          wMean[q] += dev[q] / wCount;
        }
        for (let q = 0; q < n; q++) {
          const dq = z[q] - wMean[q];
          for (let r = 0; r <= q; r++) wM2[q * n + r] += dq * dev[r];
        }
        work += n * n;
        if (ends.has(it) && wCount > 2) {
          const k = wCount;
          const cov = new Float64Array(n * n);
          // Shrink the window's covariance towards the current proposal covariance with weight
          // n/(k + n) (a short window in many dimensions is singular), plus a small ridge.
          const cur = currentCovariance();
          let meanVar = 0;
          for (let q = 0; q < n; q++) meanVar += wM2[q * n + q] / (k - 1) / n;
          for (let q = 0; q < n; q++)
            for (let r = 0; r <= q; r++) {
              let v = (k / (k + n)) * (wM2[q * n + r] / (k - 1)) + (n / (k + n)) * cur[q * n + r];
              if (r === q) v += 1e-9 * meanVar + 1e-300;
              cov[q * n + r] = v;
              cov[r * n + q] = v;
            }
          work += (n * n * n) / 3;
          if (chol.factor(cov)) L = Float64Array.from(chol.L);
          wMean.fill(0);
          wM2.fill(0);
          wCount = 0;
        }
      }
      return { accept: acc / moves };
    },
    stepSize: () => Math.exp(logC),
    work: () => work + proposals * perProposal,
  });
}
