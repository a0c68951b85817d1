/**
 * Hit-and-run along random chords of the region ("Efficient Monte Carlo procedures for generating
 * points uniformly distributed over bounded regions", Operations Research, 1984). Two engines:
 * `hitrun` (directions rounded by the Dikin ellipsoid of the barrier at the centre) and
 * `hitrun-plain` (directions uniform on the unit sphere of the reduced coordinates). Rounded: d = L⁻ᵀ u with u uniform on the unit sphere and
 * L Lᵀ = Aᵀ S⁻² A (+ ρ I on unbounded regions). The direction law is fixed and symmetric (d and −d
 * equally likely), so each move leaves the target invariant: it samples the target restricted to
 * the line through the current point.
 *
 * - Flat density on a bounded region: the new point is uniform on the chord (exact).
 * - Otherwise: slice sampling along the chord ("Slice sampling", Annals of Statistics 31(3), 2003),
 *   stepping-out with a step budget (the paper's split of the step budget keeps it reversible) and shrinkage, both
 *   confined to the chord; unbounded chords are handled by stepping out.
 *
 * One kept draw = n line moves (thinning by the dimension, common practice for hit-and-run).
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import { Rng } from '../rng';
import { backwardL, dot, isFlat } from '../geometry';
import { chord, sliceOnChord } from './common';

export interface HitRunState {
  z: Float64Array;
  s: Float64Array;
  l: number;
  exactChord: boolean;
  /** Directions L⁻ᵀu (Dikin-rounded) rather than u. */
  rounded: boolean;
  /** Slice width along t (in Dikin units). */
  width: number;
  // scratch
  d: Float64Array;
  Ad: Float64Array;
  u: Float64Array;
  trial: Float64Array;
  grad: Float64Array;
  /** Sum of |Δt| and count, for width adaptation in warm-up. */
  jumpSum: number;
  jumpCount: number;
  evals: number;
}

export function makeHitRunState(p: PreparedTarget, z0: Float64Array, exactChord: boolean, rounded = true): HitRunState {
  const n = p.n;
  const st: HitRunState = {
    z: Float64Array.from(z0),
    s: new Float64Array(p.m),
    l: NaN,
    exactChord,
    rounded,
    width: 1,
    d: new Float64Array(n),
    Ad: new Float64Array(p.m),
    u: new Float64Array(n),
    trial: new Float64Array(n),
    grad: new Float64Array(n),
    jumpSum: 0,
    jumpCount: 0,
    evals: 0,
  };
  p.rows.mul(st.z, st.s);
  for (let i = 0; i < p.m; i++) {
    st.s[i] = p.b[i] - st.s[i];
    if (!(st.s[i] > 0)) throw new Error('hit-and-run: the start is not strictly inside the region');
  }
  if (!exactChord) {
    st.l = p.logDensity(st.z, st.grad);
    st.evals++;
    if (!Number.isFinite(st.l)) throw new Error(`hit-and-run: the log-density is ${st.l} at the start`);
  }
  return st;
}


/** One line move. Returns |Δt|. */
export function hitRunStep(p: PreparedTarget, st: HitRunState, rng: Rng, adapt: boolean): number {
  const n = p.n;
  const m = p.m;
  const { d, Ad, u, z, s, trial } = st;
  rng.normals(u);
  const nu = Math.sqrt(dot(u, u));
  for (let q = 0; q < n; q++) u[q] /= nu;
  if (st.rounded) backwardL(p.dikinL, n, u, d, p.dikinFirst);
  else d.set(u);
  p.rows.mul(d, Ad);
  const [tmin, tmax] = chord(s, Ad, m);
  let t: number;
  if (st.exactChord) {
    if (!Number.isFinite(tmin) || !Number.isFinite(tmax)) {
      throw new Error('The density is flat and the region is unbounded, so the distribution is improper.');
    }
    t = tmin + (tmax - tmin) * rng.uniformPositive();
  } else {
    const f = (tt: number): number => {
      for (let q = 0; q < n; q++) trial[q] = z[q] + tt * d[q];
      st.evals++;
      const v = p.logDensity(trial, st.grad);
      return Number.isNaN(v) ? -Infinity : v;
    };
    const r = sliceOnChord(f, st.l, tmin, tmax, st.width, rng);
    t = r.t;
    st.l = r.l;
  }
  if (t === 0) return 0;
  for (let q = 0; q < n; q++) trial[q] = z[q] + t * d[q];
  // Slacks updated in closed form; a point that round-off puts on a face is not taken.
  let ok = true;
  for (let i = 0; i < m; i++) if (!(s[i] - t * Ad[i] > 0)) ok = false;
  if (!ok) {
    if (!st.exactChord) st.l = p.logDensity(z, st.grad);
    return 0;
  }
  for (let i = 0; i < m; i++) s[i] -= t * Ad[i];
  z.set(trial);
  if (adapt) {
    st.jumpSum += Math.abs(t);
    st.jumpCount++;
  }
  return Math.abs(t);
}

/** Runs a hit-and-run chain: warm-up moves adapt the slice width, then opts.draws kept draws. */
export function hitRunChain(
  p: PreparedTarget,
  start: Float64Array,
  opts: ChainOptions,
  rng: Rng,
  check: (z: Float64Array, out: Float64Array) => void,
  rounded = true,
): ChainOutput {
  const n = p.n;
  const dim = p.target.dim;
  const exact = isFlat(p) && p.bounded && p.m > 0;
  const st = makeHitRunState(p, start, exact, rounded);
  const moves = Math.max(1, n);
  const draws = new Float64Array(opts.draws * dim);
  const theta = new Float64Array(dim);
  const total = opts.warmup + opts.draws;
  for (let it = 0; it < total; it++) {
    if (opts.signal?.aborted) {
      const e = new Error('The chain was cancelled.');
      e.name = 'AbortError';
      throw e;
    }
    const warm = it < opts.warmup;
    if (it === opts.warmup) opts.onWarmupEnd?.();
    for (let k = 0; k < moves; k++) hitRunStep(p, st, rng, warm);
    if (warm && st.jumpCount > 0 && (it + 1) % 10 === 0) {
      // Slice width: a few typical jumps ("Slice sampling", 2003, §4.1, suggests a typical slice size).
      st.width = Math.max(1e-8, (3 * st.jumpSum) / st.jumpCount);
      st.jumpSum = 0;
      st.jumpCount = 0;
    }
    if (!warm) {
      check(st.z, theta);
      draws.set(theta, (it - opts.warmup) * dim);
    }
    if (opts.onProgress && (it % 20 === 0 || it === total - 1)) opts.onProgress(warm ? 'warmup' : 'sampling', it);
  }
  // Per move: A d, the chord and the slack update (≈ 2 nnz + 4 m), the direction (n² rounded).
  const perIteration = moves * (2 * p.rows.val.length + 4 * p.m + 4 * n + (rounded ? n * n : 0));
  return {
    draws,
    divergent: new Uint8Array(opts.draws),
    acceptStat: new Float64Array(opts.draws).fill(1),
    stepSize: NaN,
    work: total * perIteration,
    warmupWork: opts.warmup * perIteration,
  };
}
