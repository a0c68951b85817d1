/**
 * Pieces shared by the baseline engines: the warm-up/sampling loop that checks and stores every
 * kept draw, slack bookkeeping, uniform points in a ball, and slice sampling along a chord.
 */
import type { ChainOptions, ChainOutput } from '../types';
import type { PreparedTarget } from '../geometry';
import type { Rng } from '../rng';

export type DrawCheck = (z: Float64Array, out: Float64Array) => void;

export function abortError(): Error {
  const e = new Error('The chain was cancelled.');
  e.name = 'AbortError';
  return e;
}

/** What one iteration (one kept draw after warm-up) reports. */
export interface IterationResult {
  accept: number;
  divergent?: boolean;
  rejected?: boolean;
  energy?: number;
}

/** An engine as the loop sees it: the current point z and one iteration at a time. */
export interface LoopEngine {
  /** Current point in reduced coordinates (strictly inside the region). */
  readonly z: Float64Array;
  iterate(warm: boolean, it: number): IterationResult;
  /** Called once between the last warm-up iteration and the first kept one. */
  endWarmup?(): void;
  /** Final adapted step size (NaN when not applicable). */
  stepSize(): number;
  /** Modelled linear-algebra flops so far (density evaluations excluded). */
  work(): number;
  /** True when the engine reports a Hamiltonian per draw. */
  hasEnergy?: boolean;
}

/** Runs opts.warmup + opts.draws iterations, checking and storing every kept draw in θ. */
export function runLoop(p: PreparedTarget, opts: ChainOptions, check: DrawCheck, eng: LoopEngine): ChainOutput {
  const dim = p.target.dim;
  const draws = new Float64Array(opts.draws * dim);
  const divergent = new Uint8Array(opts.draws);
  const rejected = new Uint8Array(opts.draws);
  const acceptStat = new Float64Array(opts.draws);
  const energy = eng.hasEnergy ? new Float64Array(opts.draws) : undefined;
  const theta = new Float64Array(dim);
  const total = opts.warmup + opts.draws;
  let warmupWork = 0;
  const endWarmup = () => {
    opts.onWarmupEnd?.();
    warmupWork = eng.work();
    eng.endWarmup?.();
  };
  for (let it = 0; it < total; it++) {
    if (opts.signal?.aborted) throw abortError();
    const warm = it < opts.warmup;
    if (it === opts.warmup) endWarmup();
    const r = eng.iterate(warm, it);
    if (!warm) {
      const k = it - opts.warmup;
      check(eng.z, theta);
      draws.set(theta, k * dim);
      divergent[k] = r.divergent ? 1 : 0;
      rejected[k] = r.rejected ? 1 : 0;
      acceptStat[k] = r.accept;
      if (energy) energy[k] = r.energy ?? NaN;
    }
    if (opts.onProgress && (it % 20 === 0 || it === total - 1)) opts.onProgress(warm ? 'warmup' : 'sampling', it);
  }
  if (opts.warmup === total) endWarmup();
  return { draws, divergent, rejected, acceptStat, ...(energy ? { energy } : {}), stepSize: eng.stepSize(), work: eng.work(), warmupWork };
}

/**
 * −∂²ℓ/∂x_j² at x for every j, by central differences of the gradient with offset step(j); NaN where
 * either evaluation or the difference is not finite. x is restored.
 */
export function curvatureByDifferences(
  logDensity: (x: Float64Array, g: Float64Array) => number,
  x: Float64Array,
  step: (j: number) => number,
  out: Float64Array,
): Float64Array {
  const n = x.length;
  const g1 = new Float64Array(n);
  const g2 = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const x0 = x[j];
    const h = step(j);
    x[j] = x0 + h;
    const l1 = logDensity(x, g1);
    x[j] = x0 - h;
    const l2 = logDensity(x, g2);
    x[j] = x0;
    const c = -(g1[j] - g2[j]) / (2 * h);
    out[j] = Number.isFinite(l1) && Number.isFinite(l2) && Number.isFinite(c) ? c : NaN;
  }
  return out;
}

/** Slacks b − A z into s; false when one is not strictly positive. */
export function slacksOf(p: PreparedTarget, z: Float64Array, s: Float64Array): boolean {
  p.rows.mul(z, s);
  let ok = true;
  for (let i = 0; i < p.m; i++) {
    s[i] = p.b[i] - s[i];
    if (!(s[i] > 0)) ok = false;
  }
  return ok;
}

/** A point uniform in the unit ball of ℝⁿ: a normal direction scaled by U^{1/n} (common practice). */
export function uniformInBall(rng: Rng, u: Float64Array): Float64Array {
  rng.normals(u);
  let s = 0;
  for (let q = 0; q < u.length; q++) s += u[q] * u[q];
  const r = Math.pow(rng.uniformPositive(), 1 / u.length) / Math.sqrt(s);
  for (let q = 0; q < u.length; q++) u[q] *= r;
  return u;
}

/** Interval [tmin, tmax] of t with s − t·Ad > 0 (±Infinity when unbounded). */
export function chord(s: Float64Array, Ad: Float64Array, m: number): [number, number] {
  let tmin = -Infinity;
  let tmax = Infinity;
  for (let i = 0; i < m; i++) {
    const a = Ad[i];
    if (a > 0) tmax = Math.min(tmax, s[i] / a);
    else if (a < 0) tmin = Math.max(tmin, s[i] / a);
  }
  return [tmin, tmax];
}

const MAX_STEP_OUT = 50;

/**
 * One slice-sampling move along t ↦ f(t) on the chord (tmin, tmax), from t = 0 whose log-density
 * is l0 ("Slice sampling", Annals of Statistics, 2003: stepping out with a step budget split at
 * random, which keeps it reversible, then shrinkage). Returns the new t and its log-density
 * (t = 0 when the shrinkage gave up).
 */
export function sliceOnChord(
  f: (t: number) => number,
  l0: number,
  tmin: number,
  tmax: number,
  w: number,
  rng: Rng,
): { t: number; l: number } {
  const logy = l0 + Math.log(rng.uniformPositive());
  let L = -w * rng.uniform();
  let R = L + w;
  let J = Math.floor(MAX_STEP_OUT * rng.uniform());
  let K = MAX_STEP_OUT - 1 - J;
  if (L <= tmin) L = tmin;
  else
    while (J > 0 && f(L) > logy) {
      L -= w;
      J--;
      if (L <= tmin) {
        L = tmin;
        break;
      }
    }
  if (R >= tmax) R = tmax;
  else
    while (K > 0 && f(R) > logy) {
      R += w;
      K--;
      if (R >= tmax) {
        R = tmax;
        break;
      }
    }
  for (let k = 0; k <= 200; k++) {
    const t = L + (R - L) * rng.uniformPositive();
    const l = f(t);
    if (l > logy) return { t, l };
    if (t < 0) L = t;
    else R = t;
  }
  return { t: 0, l: l0 };
}

/** Robbins–Monro update of a log-scale towards a target acceptance (common practice). */
export function adaptLogScale(logScale: number, accept: number, target: number, iteration: number): number {
  return logScale + (accept - target) / Math.pow(iteration + 10, 0.6);
}

/** Number of nonzeros of A (for the work model). */
export function nnz(p: PreparedTarget): number {
  return p.rows.val.length;
}
