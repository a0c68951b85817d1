/**
 * Sampler entry points: one chain from a prepared target, and the automatic choice of method.
 */
import type { ChainOptions, ChainOutput, SamplerName } from '../types';
import type { PreparedTarget } from '../geometry';
import { isFlat } from '../geometry';
import { Rng } from '../rng';
import { bulkApproximation } from '../mode';
import { eliminatedTarget } from '../geometry/elimination';
import type { Cholesky } from '../linalg/cholesky';
import { RowMatrix } from '../linalg/sparse';
import { hitRunChain } from './hitrun';
import { rhmcChain } from './rhmc';
import { ballWalkChain } from './ball-walk';
import { coordHitRunChain } from './coord-hitrun';
import { dikinWalkChain } from './dikin-walk';
import { rwmChain } from './rwm';
import { reflectHmcChain } from './reflect-hmc';
import { transformHmcChain } from './transform-hmc';
import { onlyAffordableReason, APPROXIMATION_STARTS_NOTE, startsFromApproximation, startsFromPilot, STARTS_FROM_PILOT_STREAM, STARTS_NOTE, modelledWork, PILOT_CHAIN_BASE, pickByPilots, pilotPlan, pooledVariance, PROBE_ITERATIONS, rhmcWorkEstimate, scorePilot, shortlistEngines, soleCandidateReason, unpilotedReason } from './auto';

/**
 * Checker for kept draws: maps z to θ and verifies A θ ≤ b and E θ = e on the ORIGINAL rows, with a
 * tolerance of 1e-9 relative to the row's scale. Throws if a draw violates a constraint.
 */
export function makeDrawCheck(p: PreparedTarget): (z: Float64Array, out: Float64Array) => void {
  const { inequalities: I, equalities: E, dim } = p.target;
  // The rows' nonzeros, gathered once: constraint rows are mostly sparse (bounds, orderings,
  // differences), so a draw is checked in O(nonzeros) instead of O(rows × dimension).
  const SI = new RowMatrix(I.A, I.rows, dim);
  const SE = new RowMatrix(E.A, E.rows, dim);
  /** Row i of S at x: its value and the sum of the magnitudes of its terms. */
  const row = (S: RowMatrix, i: number, x: Float64Array): [number, number] => {
    let s = 0;
    let mag = 0;
    for (let q = S.ptr[i]; q < S.ptr[i + 1]; q++) {
      const t = S.val[q] * x[S.idx[q]];
      s += t;
      mag += Math.abs(t);
    }
    return [s, mag];
  };
  return (z, out) => {
    p.toTheta(z, out);
    for (let j = 0; j < dim; j++) if (!Number.isFinite(out[j])) throw new Error('A draw is not finite.');
    for (let i = 0; i < I.rows; i++) {
      const [s, mag] = row(SI, i, out);
      if (s > I.b[i] + 1e-9 * (1 + mag + Math.abs(I.b[i]))) {
        throw new Error(`Internal error: a draw violates the constraint "${I.labels[i] ?? i + 1}" (by ${(s - I.b[i]).toExponential(2)}).`);
      }
    }
    for (let i = 0; i < E.rows; i++) {
      const [s, mag] = row(SE, i, out);
      if (Math.abs(s - E.b[i]) > 1e-9 * (1 + mag + Math.abs(E.b[i]))) {
        throw new Error(`Internal error: a draw violates the equality "${E.labels[i] ?? i + 1}".`);
      }
    }
  };
}

/** Runs warm-up then keeps opts.draws draws; the returned draws are in θ coordinates. */
export function sampleChain(p0: PreparedTarget, sampler: SamplerName, start: Float64Array, opts: ChainOptions): ChainOutput {
  if (start.length !== p0.n) throw new Error(`start has length ${start.length}, expected the reduced dimension ${p0.n}`);
  // Density evaluations are counted for the run diagnostics, the benchmark and the automatic
  // choice's cost model (one closure call per evaluation).
  let evaluations = 0;
  const inner = p0.target.logDensity;
  const target = {
    ...p0.target,
    logDensity: (t: Float64Array, g: Float64Array) => {
      evaluations++;
      return inner.call(p0.target, t, g);
    },
  };
  const p: PreparedTarget = { ...p0, target, logDensity: (z, g) => (p0.N ? (evaluations++, p0.logDensity(z, g)) : target.logDensity(z, g)) };
  let warmupEvaluations = evaluations;
  const out = sampleWith(p, sampler, start, {
    ...opts,
    onWarmupEnd: () => {
      warmupEvaluations = evaluations;
      opts.onWarmupEnd?.();
    },
  });
  if (p.flat !== undefined) p0.flat = p.flat;
  out.evaluations = evaluations;
  out.warmupEvaluations = opts.draws > 0 ? warmupEvaluations : evaluations;
  return out;
}

function sampleWith(p: PreparedTarget, sampler: SamplerName, start: Float64Array, opts: ChainOptions): ChainOutput {
  const rng = new Rng(opts.seed, opts.chain);
  const check = makeDrawCheck(p);
  // A non-finite log-density at the start is reported before any work.
  const l = p.logDensity(start, new Float64Array(p.n));
  if (!Number.isFinite(l)) {
    const theta = new Float64Array(p.target.dim);
    p.toTheta(start, theta);
    const shown = p.target.names
      .slice(0, 6)
      .map((nm, j) => `${nm} = ${theta[j].toPrecision(4)}`)
      .join(', ');
    throw new Error(
      `The log-density is ${Number.isNaN(l) ? 'not a number' : l} at the chain's starting point (${shown}${p.target.dim > 6 ? ', …' : ''}). Check that every term is defined everywhere the constraints allow.`,
    );
  }
  if (isFlat(p) && !p.bounded) {
    throw new Error('The log-density is constant and the region is unbounded, so the distribution is improper: add a prior or bounds.');
  }
  switch (sampler) {
    case 'rhmc': {
      // With equalities, RHMC runs in the sparse elimination coordinates (geometry/elimination.ts)
      // so the inequality rows, and with them the metric, keep their structure.
      const el = p.N ? eliminatedTarget(p) : null;
      if (el) return rhmcChain(el.q, el.fromZ(start), opts, rng, makeDrawCheck(el.q), {});
      return rhmcChain(p, start, opts, rng, check, {});
    }
    case 'rhmc-gl':
      return rhmcChain(p, start, opts, rng, check, { integrator: 'leapfrog' });
    case 'hitrun':
      return hitRunChain(p, start, opts, rng, check, true);
    case 'hitrun-plain':
      return hitRunChain(p, start, opts, rng, check, false);
    case 'coord-hitrun':
      return coordHitRunChain(p, start, opts, rng, check);
    case 'ball-walk':
      return ballWalkChain(p, start, opts, rng, check);
    case 'dikin-walk':
      return dikinWalkChain(p, start, opts, rng, check);
    case 'rwm':
      return rwmChain(p, start, opts, rng, check);
    case 'transform-hmc':
      return transformHmcChain(p, start, opts, rng, check);
    case 'reflect-hmc':
      return reflectHmcChain(p, start, opts, rng, check);
    default:
      throw new Error(`unknown sampler "${String(sampler)}"`);
  }
}

/** The pilots' start: the analytic centre for a flat density, else a bulk point; `fallback` if that fails. */
export function pilotStart(p: PreparedTarget, fallback: Float64Array): Float64Array {
  if (isFlat(p)) return p.centre;
  return safeBulk(p)?.z ?? fallback;
}

/** The bulk approximation (mode.ts) when it is strictly inside with a finite density, else null. */
function safeBulk(p: PreparedTarget): { z: Float64Array; factor: Cholesky } | null {
  try {
    const r = bulkApproximation(p);
    const s = new Float64Array(p.m);
    p.rows.mul(r.z, s);
    for (let i = 0; i < p.m; i++) if (!(p.b[i] - s[i] > 0)) return null;
    if (!Number.isFinite(p.logDensity(r.z, new Float64Array(p.n)))) return null;
    return r;
  } catch {
    return null;
  }
}

export { shortlistEngines, evaluationCostOf, PILOT_CHAIN_BASE } from './auto';

/** A pilot run: one chain of `engine` from `start` with the given warm-up, draws and chain index. */
export type PilotRunner = (
  jobs: { engine: SamplerName; start: Float64Array; warmup: number; draws: number; chain: number }[],
) => Promise<(ChainOutput | Error)[]>;

/**
 * The automatic choice (samplers/auto.ts): shortlist by structure, then pilots of the candidates
 * (run by `runPilots`, in worker threads for a fit), scored by ESS per unit of modelled work.
 * Deterministic in (model, seed, iterations).
 */
export async function chooseEngine(
  p: PreparedTarget,
  o: { start: Float64Array; fitIterations: number; evalCost: number; chains?: number; seed?: number },
  runPilots: PilotRunner,
): Promise<{ sampler: SamplerName; reason: string; starts?: Float64Array[] }> {
  const list = shortlistEngines(p);
  if (list.candidates.length === 1) return soleCandidateReason(list);
  // Pilots start in the bulk of the mass, not at the fit's dispersed start: a flat density's bulk
  // is around the analytic centre; otherwise the first barrier stage of the mode search (mode.ts
  // bulkPoint). Pilots then measure mixing, not the journey towards the mass.
  const flat = isFlat(p);
  const bulk = flat ? null : safeBulk(p);
  const start = flat ? p.centre : (bulk?.z ?? o.start);
  // Probes: a few iterations of each candidate give its modelled work per iteration. RHMC's probe
  // alone (its step-size search) can cost more than the other pilots together, so it is probed
  // only when its estimated work (rhmcWorkEstimate) would let it afford a pilot.
  const cheap = list.candidates.map((_, k) => k).filter((k) => list.candidates[k] !== 'rhmc');
  const cheapProbes = await runPilots(
    cheap.map((k) => ({ engine: list.candidates[k], start, warmup: PROBE_ITERATIONS / 2, draws: PROBE_ITERATIONS / 2, chain: PILOT_CHAIN_BASE + k })),
  );
  const probes: (ChainOutput | Error | null)[] = list.candidates.map((_, k) => (cheap.includes(k) ? cheapProbes[cheap.indexOf(k)] : null));
  const perIteration = list.candidates.map((engine, k) => {
    const out = probes[k];
    if (out === null) return rhmcWorkEstimate(p, o.evalCost);
    return out instanceof Error ? Infinity : modelledWork(p, engine, out, o.evalCost) / PROBE_ITERATIONS;
  });
  const plan = pilotPlan(perIteration, o.fitIterations);
  for (let k = 0; k < list.candidates.length; k++) {
    if (probes[k] !== null || plan[k] === 0) continue;
    const [out] = await runPilots([{ engine: list.candidates[k], start, warmup: PROBE_ITERATIONS / 2, draws: PROBE_ITERATIONS / 2, chain: PILOT_CHAIN_BASE + k }]);
    probes[k] = out;
    perIteration[k] = out instanceof Error ? Infinity : modelledWork(p, list.candidates[k], out, o.evalCost) / PROBE_ITERATIONS;
    plan[k] = pilotPlan(perIteration, o.fitIterations)[k];
  }
  const run = list.candidates.map((_, k) => k).filter((k) => plan[k] > 0);
  if (run.length <= 1) {
    // Nothing to compare: the one candidate that can afford a pilot (or, if none can, the first by
    // structure) is used without one.
    const u = run.length === 1 ? onlyAffordableReason(list, run[0]) : unpilotedReason(list);
    // No pilot draws: the chains start from the Gaussian approximation at the bulk point, widened.
    if (!bulk || !o.chains) return u;
    const starts = startsFromApproximation(p, bulk.z, bulk.factor, o.chains, new Rng(o.seed ?? 1, STARTS_FROM_PILOT_STREAM));
    return starts ? { ...u, reason: `${u.reason} ${APPROXIMATION_STARTS_NOTE}`, starts } : u;
  }
  const outs = await runPilots(
    run.map((k) => ({
      engine: list.candidates[k],
      start,
      warmup: Math.floor(plan[k] / 2),
      draws: plan[k] - Math.floor(plan[k] / 2),
      chain: PILOT_CHAIN_BASE + list.candidates.length + k,
    })),
  );
  const ok = outs.filter((x): x is ChainOutput => !(x instanceof Error));
  const V = pooledVariance(p.target.dim, ok);
  const scores = list.candidates.map((engine, k) => {
    const r = run.indexOf(k);
    const pr = probes[k];
    if (r < 0) return pr instanceof Error ? scorePilot(p, engine, pr, 0, o.evalCost) : { engine, essPerIteration: 0, workPerIteration: Infinity, score: 0 };
    return scorePilot(p, engine, outs[r], Math.floor(plan[k] / 2), o.evalCost, V);
  });
  const pick = pickByPilots(list, scores, plan);
  if (!o.chains) return pick;
  // The fit's chains start from the chosen engine's pilot draws pushed away from the bulk point
  // (overdispersed relative to the posterior the pilots saw), instead of from the region's spread.
  const chosen = run.indexOf(list.candidates.indexOf(pick.sampler));
  const pilot = chosen >= 0 ? outs[chosen] : undefined;
  const rng = new Rng(o.seed ?? 1, STARTS_FROM_PILOT_STREAM);
  const starts = pilot && !(pilot instanceof Error) ? startsFromPilot(p, start, pilot, o.chains, rng) : null;
  if (starts) return { ...pick, reason: `${pick.reason} ${STARTS_NOTE}`, starts };
  const approx = bulk ? startsFromApproximation(p, bulk.z, bulk.factor, o.chains, rng) : null;
  return approx ? { ...pick, reason: `${pick.reason} ${APPROXIMATION_STARTS_NOTE}`, starts: approx } : pick;
}
