/**
 * Contracts between the model-language compiler, the samplers and the fit orchestration.
 * Pure types: nothing here imports Express, the database or the client.
 */

/** Rows of a linear system over the unknowns' flat coordinates, row-major. */
export interface LinearSystem {
  rows: number;
  cols: number;
  /** rows × cols, row-major: A[i * cols + j]. */
  A: Float64Array;
  /** Right-hand side, length rows. Inequalities read A θ ≤ b, equalities E θ = e. */
  b: Float64Array;
  /** One human-readable label per row, e.g. "line 7: mu[1] <= mu[2]". Used in messages. */
  labels: string[];
}

/** A target density exp(ℓ(θ)) restricted to {θ : A θ ≤ b, E θ = e}. */
export interface ModelTarget {
  /** Number of flat coordinates of the unknowns. */
  dim: number;
  /** Flat coordinate names: "sigma", "mu[3]" (1-based element indices). */
  names: string[];
  /**
   * ℓ(θ) up to an additive constant. Writes ∇ℓ(θ) into grad (length dim, overwritten).
   * Returns -Infinity (or NaN) where the density is zero or undefined.
   */
  logDensity(theta: Float64Array, grad: Float64Array): number;
  inequalities: LinearSystem;
  equalities: LinearSystem;
  /** Derived quantities evaluated per draw (may be absent). */
  derived?: DerivedQuantities;
}

export interface DerivedQuantities {
  names: string[];
  /** Fills out (length names.length) from one draw θ. */
  evaluate(theta: Float64Array, out: Float64Array): void;
}

/** One data column as the compiler and engine see it. Category columns are coded 1..K (1-based). */
export interface DataColumn {
  type: 'numeric' | 'integer' | 'category';
  values: Float64Array;
  /** For category columns: the level names, levels[k-1] is code k. */
  levels?: string[];
}

export interface DataTable {
  rows: number;
  columns: Record<string, DataColumn>;
}

export type DataTables = Record<string, DataTable>;

/**
 * How a worker thread rebuilds a target: targets hold closures and cannot cross threads.
 * - program: model-language source plus its data, compiled inside the worker; `priorOnly` drops
 *   the likelihood terms (shared/lang/roles.ts) for a fit of the prior alone;
 * - module: an ES module exporting a factory (used by tests and the benchmark).
 */
export type TargetSpec =
  | { kind: 'program'; source: string; tables: DataTables; priorOnly?: boolean }
  | { kind: 'module'; modulePath: string; exportName: string; args: unknown };

/* ------------------------------------------------------------------------------------------ */
/* Samplers (server/engine/samplers) ↔ fit orchestration (server/engine/fit.ts)                */
/* ------------------------------------------------------------------------------------------ */

/** Engines a chain can run with (see docs/engine.md §9); 'auto' is resolved before chains start. */
export type SamplerName =
  | 'rhmc'
  | 'rhmc-gl'
  | 'hitrun'
  | 'hitrun-plain'
  | 'coord-hitrun'
  | 'ball-walk'
  | 'dikin-walk'
  | 'rwm'
  | 'transform-hmc'
  | 'reflect-hmc';

export interface ChainOptions {
  warmup: number;
  draws: number;
  seed: number;
  /** Chain index, mixed into the seed so chains differ. */
  chain: number;
  /** Called at most every few iterations. */
  onProgress?: (phase: 'warmup' | 'sampling', iteration: number) => void;
  /** Checked between iterations; a cancelled chain throws an Error named 'AbortError'. */
  signal?: AbortSignal;
  /** Called once, just before the first kept iteration (after warm-up). */
  onWarmupEnd?: () => void;
}

export interface ChainOutput {
  /** draws × dim, row-major, in the unknowns' original flat coordinates θ. */
  draws: Float64Array;
  /** Hamiltonian at each kept draw (RHMC only), for E-FMI. */
  energy?: Float64Array;
  /**
   * 1 where the transition that produced the draw diverged: its energy error blew up (non-finite,
   * or above 1000 as in common practice), which marks a region the integrator cannot resolve.
   */
  divergent: Uint8Array;
  /**
   * 1 where the transition was rejected because a step could not be completed (an implicit solve
   * did not converge, M was not positive definite, the step left the region, or the run-back check
   * failed). Such rejections keep the chain exact and only cost efficiency. Absent (read as zeros)
   * for samplers without such rejections (hit-and-run) and in chains stored before it existed.
   */
  rejected?: Uint8Array;
  /** Metropolis acceptance statistic per kept draw (1 for exact-chord moves). */
  acceptStat: Float64Array;
  /** Final adapted step size (NaN where not applicable). */
  stepSize: number;
  /** Mean metric factorisations per integrator step (RHMC). */
  factorizationsPerStep?: number;
  /** Mean integrator steps per kept draw, including the step at which a trajectory failed (RHMC). */
  stepsPerDraw?: number;
  /** Mean iterations of the implicit solvers per integrator step, run-back included (RHMC). */
  solverIterationsPerStep?: number;
  /** Share of kept draws whose transition was rejected (mean of `rejected`). */
  rejectedFraction?: number;
  /** Adapted mean integration time ε·L in metric units (RHMC). */
  integrationTime?: number;
  /** How the metric was factorised: diagonal, banded, diagonal+low-rank, banded+low-rank, dense (RHMC). */
  metricStructure?: string;
  /** RHMC integrator: 'midpoint' (default) or 'leapfrog' (generalised leapfrog). */
  integrator?: string;
  /**
   * Modelled linear-algebra work of the whole chain in flops, density evaluations excluded (the
   * automatic choice's deterministic cost model; absent for samplers that do not count it).
   */
  work?: number;
  /** Log-density (with gradient) evaluations of the whole chain, warm-up included. */
  evaluations?: number;
  /** Of those, the evaluations made during warm-up (sampleChain). */
  warmupEvaluations?: number;
  /** Of `work`, the part done during warm-up (engines that count their work). */
  warmupWork?: number;
}

/** One chain's kept output plus the derived quantities evaluated per draw. */
export interface ChainResult extends ChainOutput {
  chain: number;
  /** draws × derivedNames.length, row-major (empty when there are none). */
  derivedDraws: Float64Array;
}

export interface FitResult {
  /** Names of unknowns' flat coordinates, then derived quantities. */
  unknownNames: string[];
  derivedNames: string[];
  chains: ChainResult[];
  summary: import('../../shared/fit').FitSummary;
}
