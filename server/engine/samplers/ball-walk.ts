/**
 * Ball walk ("Random walks in a convex body and an improved volume algorithm", Random Structures &
 * Algorithms, 1993): from z propose y uniform in the Euclidean ball of radius r around z (reduced
 * coordinates); a y outside the region is rejected, otherwise y is accepted with probability
 * min(1, π(y)/π(z)) (Metropolis filter; always 1 for a flat density). The proposal is symmetric, so
 * the move leaves π restricted to the region invariant.
 *
 * The radius is adapted in warm-up (Robbins–Monro on log r towards an acceptance of 0.25, a common
 * choice for random-walk proposals) and frozen for sampling. One kept draw = n moves.
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import { isFlat } from '../geometry';
import type { Rng } from '../rng';
import { adaptLogScale, nnz, runLoop, slacksOf, uniformInBall, type DrawCheck } from './common';

export const BALL_TARGET_ACCEPT = 0.25;

export function ballWalkChain(p: PreparedTarget, start: Float64Array, opts: ChainOptions, rng: Rng, check: DrawCheck): ChainOutput {
  const n = p.n;
  const m = p.m;
  const flat = isFlat(p);
  const z = Float64Array.from(start);
  const s = new Float64Array(m);
  if (!slacksOf(p, z, s)) throw new Error('ball walk: the start is not strictly inside the region');
  const u = new Float64Array(n);
  const Au = new Float64Array(m);
  const y = new Float64Array(n);
  const grad = new Float64Array(n);
  let l = flat ? 0 : p.logDensity(z, grad);
  // Initial radius: the Dikin ellipsoid's mean axis at the centre over √n.
  let tr = 0;
  for (let q = 0; q < n * n; q++) tr += p.dikinL[q] * p.dikinL[q];
  let logR = Math.log(1 / Math.sqrt(Math.max(tr / n, 1e-300)) / Math.sqrt(n));
  let adaptCount = 0;
  const moves = Math.max(1, n);
  let totalMoves = 0;
  const perMove = 2 * nnz(p) + 3 * m + 6 * n;
  const move = (warm: boolean): number => {
    totalMoves++;
    const r = Math.exp(logR);
    uniformInBall(rng, u);
    for (let q = 0; q < n; q++) u[q] *= r;
    p.rows.mul(u, Au);
    let inside = true;
    for (let i = 0; i < m; i++)
      if (!(s[i] - Au[i] > 0)) {
        inside = false;
        break;
      }
    let a = 0;
    if (inside) {
      for (let q = 0; q < n; q++) y[q] = z[q] + u[q];
      let ly = 0;
      if (!flat) {
        ly = p.logDensity(y, grad);
        if (Number.isNaN(ly)) ly = -Infinity;
      }
      a = flat ? 1 : ly >= l ? 1 : Math.exp(ly - l);
      if (flat || rng.uniform() < a) {
        z.set(y);
        for (let i = 0; i < m; i++) s[i] -= Au[i];
        l = ly;
      }
    }
    if (warm) logR = adaptLogScale(logR, a, BALL_TARGET_ACCEPT, adaptCount++);
    return a;
  };
  return runLoop(p, opts, check, {
    z,
    iterate(warm) {
      // Slacks are updated in closed form by the moves; recomputed exactly once per iteration.
      slacksOf(p, z, s);
      let acc = 0;
      for (let k = 0; k < moves; k++) acc += move(warm);
      return { accept: acc / moves };
    },
    stepSize: () => Math.exp(logR),
    work: () => totalMoves * perMove,
  });
}
