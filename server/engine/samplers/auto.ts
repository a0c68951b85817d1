/**
 * The automatic choice of engine ('auto'): rules from the model's structure where the answer is
 * clear, otherwise short pilot chains of the shortlisted engines compared by effective draws per
 * unit of modelled work (docs/engine.md §9.2).
 *
 * - Rules (no pilots): no inequalities → reflective HMC (plain HMC); a flat density on a box →
 *   coordinate hit-and-run; any density on a product of bounds, simplices and orderings (flat on a
 *   box excepted) → transform-based HMC.
 * - Candidates otherwise (a general polytope): a flat density → rounded hit-and-run and reflective
 *   HMC; a varying density → RHMC and reflective HMC (reflective first when RHMC's metric would be
 *   factorised densely).
 * - Pilots: start at the bulk point (mode.ts bulkApproximation; the analytic centre for a flat
 *   density). A probe of PROBE_ITERATIONS iterations measures each candidate's modelled work per
 *   iteration; then one pilot chain per candidate, seeded with the fit's seed and a chain index of
 *   its own (PILOT_CHAIN_BASE + k), half warm-up. All pilots together cost about PILOT_SHARE (8%)
 *   of the fit's work at the cheapest candidate's rate, each between PILOT_MIN and PILOT_MAX
 *   iterations (pilotPlan). Pilot draws are warm-up: they are never returned or summarised.
 * - Score: ESS per kept iteration from the pilot's mean squared jumps against the variance of all
 *   pilots pooled (scorePilot), minimum over coordinates, divided by the modelled work per kept
 *   iteration (keptWorkPerIteration: the pilot's sampling phase, its warm-up left out) = density
 *   evaluations × the model's evaluation cost (50 + 10·dim + 12·data cells) + the engine's own
 *   linear-algebra flops. Work is counted, not timed, so the same model and seed
 *   always give the same choice and therefore identical draws.
 * - Choice: the first candidate by structure, unless another's score is more than PILOT_MARGIN (2)
 *   times its score (pickByPilots).
 * - Starts: the chains start from the chosen pilot's draws moved START_EXPANSION× as far from the
 *   bulk point (startsFromPilot), or, without pilots, from the widened Gaussian approximation there
 *   (startsFromApproximation); rules keep the fit's dispersed starts.
 * - The engine is decided once per fit, before any chain starts (server/engine/fit.ts), and every
 *   chain runs it.
 */
import type { ChainOutput, DataTables, SamplerName, TargetSpec } from '../types';
import type { PreparedTarget } from '../geometry';
import { isFlat } from '../geometry';
import type { Rng } from '../rng';
import type { Cholesky } from '../linalg/cholesky';
import { detectTransformShape } from './transform-hmc';
import { detectStructure } from '../linalg/metric';
import { eliminatedTarget } from '../geometry/elimination';

export interface Shortlist {
  candidates: SamplerName[];
  /** Why these, one clause. */
  why: string;
}

export function shortlistEngines(p: PreparedTarget): Shortlist {
  const flat = isFlat(p);
  if (flat && !p.bounded) {
    throw new Error('The log-density is constant and the region is unbounded, so the distribution is improper: add a prior or bounds.');
  }
  // Without inequalities both HMC engines are plain HMC (no faces, no transforms to make).
  if (p.m === 0) return { candidates: ['reflect-hmc'], why: 'there are no inequality constraints, so plain HMC applies' };
  const shape = detectTransformShape(p.target);
  if (flat) {
    // Rules for a flat density, where the answer does not depend on a likelihood.
    // A box (every kept row bounds one reduced coordinate): the coordinates are independent
    // uniforms, so each coordinate move of coordinate hit-and-run is an exact draw of its
    // coordinate, at the cost of one chord (no density evaluation).
    if (isBox(p)) {
      return {
        candidates: ['coord-hitrun'],
        why: 'the density is flat on a box (every constraint bounds one coordinate), so the coordinates are independent uniforms that coordinate hit-and-run draws exactly, one move each',
      };
    }
    // A product of bounds, simplices and orderings: the transforms turn the uniform into a smooth
    // unconstrained density without faces, on which HMC moves far per gradient.
    if (shape.ok) {
      return {
        candidates: ['transform-hmc'],
        why: `the density is flat and the region is a product of standard shapes (${shape.plan.description}), whose exact transforms give HMC a smooth density without faces`,
      };
    }
    // A general polytope: rounded hit-and-run (affine-invariant, exact chords, no gradient) against
    // reflective HMC (long moves when the shape is well scaled along the coordinates).
    return { candidates: ['hitrun', 'reflect-hmc'], why: 'the density is flat on a general polytope' };
  }
  // A varying density: the gradient-based engines (the walks' slice moves cost many evaluations
  // per draw and were never ahead on a varying density in the benchmark, bench/results/samplers.md).
  if (shape.ok) {
    // A product of standard shapes: the exact transforms remove the faces, and with its metric
    // started at the curvature transform-based HMC was ahead of RHMC or within 0.8× of it on every
    // such problem of the benchmark (P3, P4, P5, P8; reflective HMC far behind both), while pilots
    // between the two cost up to a fifth of a short fit and their scores misranked them
    // (bench/results/samplers.md, docs/engine.md §9.2). So it is taken by rule, without pilots.
    return {
      candidates: ['transform-hmc'],
      why: `the region is a product of standard shapes (${shape.plan.description}) and the density varies; their exact transforms give HMC a smooth density without faces`,
    };
  }
  // A general polytope. Order matters only when the fit is too short for pilots (the first
  // candidate is used): RHMC before reflective HMC unless its barrier metric has to be factorised
  // densely.
  const c: SamplerName[] = detectStructure(p.rows).kind === 'dense' ? ['reflect-hmc', 'rhmc'] : ['rhmc', 'reflect-hmc'];
  return { candidates: c, why: 'the region is a general polytope and the density varies' };
}

/** True when every kept inequality row involves a single reduced coordinate (a box, possibly half-open). */
export function isBox(p: PreparedTarget): boolean {
  for (let i = 0; i < p.m; i++) if (p.rows.ptr[i + 1] - p.rows.ptr[i] !== 1) return false;
  return true;
}

/** Modelled cost of one log-density evaluation, in flops, from the model's size. */
export function evaluationCost(dim: number, tables?: DataTables): number {
  let cells = 0;
  for (const t of Object.values(tables ?? {})) cells += t.rows * Object.keys(t.columns).length;
  return 50 + 10 * dim + 12 * cells;
}

export function evaluationCostOf(spec: TargetSpec | null, dim: number): number {
  return evaluationCost(dim, spec && spec.kind === 'program' ? spec.tables : undefined);
}

/** Iterations of the probe that measures each candidate's work per iteration (half warm-up). */
export const PROBE_ITERATIONS = 6;
/** Share of the fit's work (at the cheapest candidate's cost per iteration) spent on all pilots. */
export const PILOT_SHARE = 0.08;
export const PILOT_MIN = 30;
export const PILOT_MAX = 200;

/**
 * Pilot iterations per candidate: together the pilots may cost PILOT_SHARE of what the whole fit
 * (fitIterations over all chains) would cost with the cheapest candidate; each gets an equal share
 * of that work, in iterations between PILOT_MIN and PILOT_MAX. Candidates whose probe failed get 0.
 */
export function pilotPlan(workPerIteration: number[], fitIterations: number): number[] {
  const finite = workPerIteration.filter((w) => Number.isFinite(w) && w > 0);
  const wMin = finite.length ? Math.min(...finite) : 1;
  const each = (PILOT_SHARE * fitIterations * wMin) / Math.max(1, finite.length);
  // A candidate whose PILOT_MIN iterations would cost more than its share is not piloted (0): a
  // candidate that expensive per iteration would need to mix far better to pay for itself, and its
  // pilot alone would cost more than the choice may.
  return workPerIteration.map((w) => {
    if (!Number.isFinite(w)) return 0;
    const it = Math.floor(each / Math.max(w, 1e-12));
    return it >= PILOT_MIN ? Math.min(PILOT_MAX, it) : 0;
  });
}

/** Chain index of candidate k's pilot (its own random stream, far from the fit's chains). */
export const PILOT_CHAIN_BASE = 1000;

export interface PilotScore {
  engine: SamplerName;
  /** Min over coordinates of bulk and tail ESS per kept pilot iteration. */
  essPerIteration: number;
  /** Modelled flops per iteration. */
  workPerIteration: number;
  /** ESS per million modelled flops (0 when the pilot failed). */
  score: number;
  error?: string;
}

/**
 * RHMC's linear-algebra flops per integrator step: about three factorisations of the barrier metric
 * Aᵀ W A + Λ plus a dozen solves, at the cost of the structure the metric is factorised with
 * (linalg/metric.ts: diagonal, banded, plus low rank by Woodbury, or dense; the generalised
 * leapfrog, `rhmc-gl`, always factorises densely).
 */
export function rhmcStepWork(p: PreparedTarget, dense = false): number {
  const n = p.n;
  // RHMC runs models with equalities in the sparse elimination coordinates (samplers/index.ts).
  const rows = !dense && p.N ? (eliminatedTarget(p)?.q.rows ?? p.rows) : p.rows;
  const s = detectStructure(rows, dense ? 'dense' : undefined);
  const k = s.lowRankRows.length;
  const band = s.bandwidth;
  let factor: number;
  let solve: number;
  if (s.kind === 'dense') {
    let gram = 0;
    for (let i = 0; i < rows.m; i++) gram += (rows.ptr[i + 1] - rows.ptr[i]) ** 2;
    factor = (n * n * n) / 3 + gram;
    solve = n * n;
  } else {
    // band: n·b² to factor, n·b per solve; Woodbury: k solves and a k × k system
    factor = n * (band + 1) * (band + 1) + k * n * (band + 1) + (k * k * k) / 3;
    solve = n * (band + 1) + k * n;
  }
  return 3 * factor + 12 * (solve + rows.val.length);
}

/**
 * RHMC's work per iteration before probing it: about 20 integrator steps per trajectory (the
 * implicit-midpoint integrator's median on the 50-dimensional benchmark problems, bench/rhmc), each
 * with its linear algebra and one evaluation.
 */
export function rhmcWorkEstimate(p: PreparedTarget, evalCost: number): number {
  return 20 * (rhmcStepWork(p) + evalCost);
}

/** Modelled flops of a chain: evaluations × their cost + the engine's linear algebra. */
export function modelledWork(p: PreparedTarget, engine: SamplerName, out: ChainOutput, evalCost: number): number {
  return (out.evaluations ?? 0) * evalCost + linearAlgebraWork(p, engine, out);
}

/**
 * Modelled work per kept iteration of a pilot: the sampling phase's work only, when the chain
 * reports how much of it was warm-up. A pilot's warm-up is short and dominated by its first
 * iterations (step-size search, a metric still far from the posterior's scales), which a fit's
 * long warm-up amortises; the kept iterations run at the adapted settings the fit will mostly use.
 * Falls back to the whole chain's work per iteration.
 */
export function keptWorkPerIteration(p: PreparedTarget, engine: SamplerName, out: ChainOutput, warmup: number, evalCost: number): number {
  const draws = out.draws.length / p.target.dim;
  const total = modelledWork(p, engine, out, evalCost);
  if (draws < 1 || out.warmupEvaluations === undefined) return total / Math.max(1, warmup + draws);
  const evals = (out.evaluations ?? 0) - out.warmupEvaluations;
  let la: number;
  if (out.work === undefined) la = evals * uncountedStepWork(p, engine);
  else if (out.warmupWork !== undefined) la = out.work - out.warmupWork;
  else la = (out.work * draws) / Math.max(1, warmup + draws);
  return (evals * evalCost + la) / draws;
}

/**
 * Linear-algebra work per evaluation of an engine that does not count its own: RHMC, one
 * evaluation per integrator step, each step's linear algebra modelled from the metric's structure.
 */
function uncountedStepWork(p: PreparedTarget, engine: SamplerName): number {
  return engine === 'rhmc' || engine === 'rhmc-gl' ? rhmcStepWork(p, engine === 'rhmc-gl') : 0;
}

function linearAlgebraWork(p: PreparedTarget, engine: SamplerName, out: ChainOutput): number {
  return out.work ?? (out.evaluations ?? 0) * uncountedStepWork(p, engine);
}

/**
 * Per-coordinate variance of all pilots' kept draws pooled: a pilot that never explores a long
 * direction cannot hide it, because the candidates that do explore it widen the pooled variance.
 */
export function pooledVariance(dim: number, outs: ChainOutput[]): Float64Array {
  const mean = new Float64Array(dim);
  const m2 = new Float64Array(dim);
  let count = 0;
  for (const o of outs) {
    const draws = o.draws.length / dim;
    for (let i = 0; i < draws; i++) {
      count++;
      for (let j = 0; j < dim; j++) {
        const x = o.draws[i * dim + j];
        const d = x - mean[j];
        mean[j] += d / count;
        m2[j] += d * (x - mean[j]);
      }
    }
  }
  for (let j = 0; j < dim; j++) m2[j] = count > 1 ? m2[j] / (count - 1) : 0;
  return m2;
}

/**
 * Scores one pilot. Mixing per kept iteration: for each coordinate j, r_j = mean squared jump
 * between consecutive kept draws / (2 × pooled variance of j); under a first-order autoregressive
 * approximation (lag-one autocorrelation 1 − r) the ESS per draw is r/(2 − r), capped at 1. The
 * minimum over coordinates (the benchmark's min-ESS objective) over the modelled work per
 * iteration is the score. Less noisy than the ESS of a short single chain, which moreover cannot
 * see a direction the pilot never explored.
 */
export function scorePilot(
  p: PreparedTarget,
  engine: SamplerName,
  out: ChainOutput | Error,
  pilotWarmup: number,
  evalCost: number,
  pooledVar?: Float64Array,
): PilotScore {
  if (out instanceof Error) return { engine, essPerIteration: 0, workPerIteration: Infinity, score: 0, error: out.message };
  const dim = p.target.dim;
  const draws = out.draws.length / dim;
  const V = pooledVar ?? pooledVariance(dim, [out]);
  let essPerIteration = 1;
  for (let j = 0; j < dim; j++) {
    if (!(V[j] > 0)) continue;
    let jump = 0;
    for (let i = 1; i < draws; i++) {
      const d = out.draws[i * dim + j] - out.draws[(i - 1) * dim + j];
      jump += d * d;
    }
    const r = jump / Math.max(1, draws - 1) / (2 * V[j]);
    essPerIteration = Math.min(essPerIteration, r >= 1 ? 1 : r / (2 - r));
  }
  if (draws < 2) essPerIteration = 0;
  const workPerIteration = keptWorkPerIteration(p, engine, out, pilotWarmup, evalCost);
  return { engine, essPerIteration, workPerIteration, score: workPerIteration > 0 ? (1e6 * essPerIteration) / workPerIteration : 0 };
}

/**
 * A later candidate replaces the first by structure only when its pilot scores more than this many
 * times as well. Pilot scores rest on ~100 kept draws (their relative error is tens of per cent),
 * and short pilots are pessimistic for the engines whose metric is learned in warm-up windows
 * (transform-based and reflective HMC) against RHMC, whose metric starts from the curvature: a close
 * score is no evidence against the structural order (measured in bench/results/samplers.md).
 */
export const PILOT_MARGIN = 2;

/** Picks the first candidate unless a later one's pilot scores PILOT_MARGIN× better (then the best), and writes the reason. */
export function pickByPilots(list: Shortlist, scores: PilotScore[], iterations: number[]): { sampler: SamplerName; reason: string } {
  let best = scores[0];
  for (const s of scores.slice(1)) if (s.score > PILOT_MARGIN * scores[0].score && s.score > best.score) best = s;
  const fmt = (x: number) => (x >= 100 ? x.toFixed(0) : x >= 1 ? x.toFixed(2) : x.toPrecision(2));
  const table = scores
    .map((s, k) => `${s.engine} ${s.error ? 'failed' : iterations[k] === 0 ? 'too costly to pilot' : `${fmt(s.score)} (${iterations[k]} iterations)`}`)
    .join(', ');
  return {
    sampler: best.engine,
    reason: `Automatic: ${list.why}, so the candidates were ${list.candidates.join(', ')}. Pilot chains (warm-up only, never kept) gave effective draws per million modelled operations of ${table}; ${best.engine} was used for every chain (the first by structure is kept unless another scores more than ${PILOT_MARGIN}× as well).`,
  };
}

/** No candidate can be piloted within the budget (a short fit): the first of the shortlist. */
export function unpilotedReason(list: Shortlist): { sampler: SamplerName; reason: string } {
  return {
    sampler: list.candidates[0],
    reason: `Automatic: ${list.why}, so the candidates were ${list.candidates.join(', ')}; the fit is too short for pilots within 8% of its work, so the first by structure, ${list.candidates[0]}, was used.`,
  };
}

/** Only candidate k can afford a pilot within the fit's share: it is used, without a pilot. */
export function onlyAffordableReason(list: Shortlist, k: number): { sampler: SamplerName; reason: string } {
  const others = list.candidates.filter((_, j) => j !== k);
  return {
    sampler: list.candidates[k],
    reason: `Automatic: ${list.why}, so the candidates were ${list.candidates.join(', ')}; a pilot of ${others.join(' or ')} would cost more than its share of 8% of the fit's work (their work per iteration, from a 6-iteration probe or an estimate, is too high for this fit's length), so ${list.candidates[k]} was used without pilots.`,
  };
}

/** A single candidate needs no pilot. */
export function soleCandidateReason(list: Shortlist): { sampler: SamplerName; reason: string } {
  return { sampler: list.candidates[0], reason: `Automatic: ${list.why}, so ${list.candidates[0]} was used without pilots.` };
}

/** Random stream of the starts drawn from a pilot (distinct from the fit's dispersed starts). */
export const STARTS_FROM_PILOT_STREAM = 0x57a7;
/** Expansion of a pilot draw away from the bulk point: starts with 1.5² times the posterior's spread. */
export const START_EXPANSION = 1.5;
export const STARTS_NOTE = `Its chains start from the chosen pilot's draws moved ${START_EXPANSION}× as far from the bulk point (the first barrier stage of the mode search), so they are overdispersed relative to the posterior the pilots saw.`;

/**
 * Starts for `count` chains: kept draws of the chosen engine's pilot (spread over its run), each
 * moved START_EXPANSION times as far from the pilots' start `bulk`, pulled back towards the draw
 * until strictly inside with a margin. Starting from an overdispersed approximation of the
 * posterior found from its mode is the recommendation of "Inference from iterative simulation using
 * multiple sequences" (Statistical Science, 1992); the region-wide dispersed starts can be far
 * out in the tails of a concentrated posterior, where a gradient-based warm-up adapts badly.
 * Returns null when the pilot kept too few draws.
 */
export function startsFromPilot(p: PreparedTarget, bulk: Float64Array, pilot: ChainOutput, count: number, rng: Rng): Float64Array[] | null {
  const dim = p.target.dim;
  const n = p.n;
  const draws = pilot.draws.length / dim;
  if (draws < 2) return null;
  const out: Float64Array[] = [];
  const z = new Float64Array(n);
  const y = new Float64Array(n);
  const s = new Float64Array(p.m);
  for (let c = 0; c < count; c++) {
    // Draws from the second half of the pilot's kept draws, one per chain, in a random order.
    const i = draws - 1 - Math.floor(rng.uniform() * Math.max(1, Math.floor(draws / 2)));
    toReduced(p, pilot.draws.subarray(i * dim, (i + 1) * dim), z);
    let f = START_EXPANSION;
    let ok = false;
    for (let k = 0; k < 30 && !ok; k++) {
      for (let q = 0; q < n; q++) y[q] = bulk[q] + f * (z[q] - bulk[q]);
      p.rows.mul(y, s);
      ok = true;
      for (let r = 0; r < p.m; r++) if (!(p.b[r] - s[r] > 1e-9 * (1 + Math.abs(p.b[r])))) ok = false;
      if (ok && !Number.isFinite(p.logDensity(y, new Float64Array(n)))) ok = false;
      f = 1 + (f - 1) * 0.5;
    }
    if (!ok) return null;
    out.push(Float64Array.from(y));
  }
  return out;
}

export const APPROXIMATION_STARTS_NOTE = `Its chains start from draws of the Gaussian approximation at the bulk point (the first barrier stage of the mode search), its spread widened ${START_EXPANSION}×.`;

/**
 * Starts when no pilot ran: z = bulk + START_EXPANSION · L⁻ᵀ ξ, ξ standard normal, where LLᵀ is the
 * curvature at the bulk point (mode.ts bulkApproximation) — an overdispersed Gaussian
 * approximation centred in the mass ("Inference from iterative simulation using multiple
 * sequences", Statistical Science, 1992); each pulled towards the bulk point until strictly inside.
 */
export function startsFromApproximation(p: PreparedTarget, bulk: Float64Array, factor: Cholesky, count: number, rng: Rng): Float64Array[] | null {
  const n = p.n;
  const out: Float64Array[] = [];
  const xi = new Float64Array(n);
  const d = new Float64Array(n);
  const y = new Float64Array(n);
  const s = new Float64Array(p.m);
  for (let c = 0; c < count; c++) {
    rng.normals(xi);
    factor.backward(xi, d);
    let f = START_EXPANSION;
    let ok = false;
    for (let k = 0; k < 40 && !ok; k++) {
      for (let q = 0; q < n; q++) y[q] = bulk[q] + f * d[q];
      p.rows.mul(y, s);
      ok = true;
      for (let r = 0; r < p.m; r++) if (!(p.b[r] - s[r] > 1e-9 * (1 + Math.abs(p.b[r])))) ok = false;
      if (ok && !Number.isFinite(p.logDensity(y, new Float64Array(n)))) ok = false;
      f *= 0.7;
    }
    if (!ok) return null;
    out.push(Float64Array.from(y));
  }
  return out;
}

/** θ → z: z = Nᵀ(θ − θ₀) (N orthonormal), or θ itself without equalities. */
function toReduced(p: PreparedTarget, theta: Float64Array, z: Float64Array): void {
  const n = p.n;
  if (!p.N) {
    for (let q = 0; q < n; q++) z[q] = theta[q];
    return;
  }
  z.fill(0);
  const dim = p.target.dim;
  for (let j = 0; j < dim; j++) {
    const d = theta[j] - p.theta0[j];
    for (let q = 0; q < n; q++) z[q] += p.N[j * n + q] * d;
  }
}
