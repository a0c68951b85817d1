/**
 * Fit orchestration: from a target spec and settings to draws, diagnostics and a verdict.
 *
 *   spec → target (compile the program, or import the module factory) → prepare (presolve, centre)
 *   → sampler (settings, or the automatic choice with its reason) → dispersed starts
 *   → chains (worker threads, at most os.availableParallelism() at once; or in-process)
 *   (each kept draw checked against every constraint by its sampler)
 *   → summaries, run diagnostics, verdict → schema validation.
 *
 * Reproducibility: the starts come from one seeded stream in the main thread and every chain runs
 * with (seed, chain index), so the same seed gives identical draws whether the chains run in
 * workers, in-process, or with any number of workers.
 */
import { Worker } from 'node:worker_threads';
import os from 'node:os';
import {
  fitSettingsSchema,
  fitSummarySchema,
  FIT_LIMITS,
  type FitProgress,
  type FitSettings,
  type FitSummary,
} from '../../shared/fit';
import type { ChainResult, FitResult, SamplerName, TargetSpec } from './types';
import { Rng } from './rng';
import { dispersedStarts, type PreparedTarget } from './geometry';
import { chooseEngine, evaluationCostOf } from './samplers';
import { findMode } from './mode';
import { summarise } from './summarise';
import { preparedFor, runChainOnPrepared, type ChainJob } from './fit-worker';

export interface RunFitOptions {
  onProgress?(p: FitProgress): void;
  signal?: AbortSignal;
  /** Run chains on worker threads (default true). false runs them one after another in-process. */
  parallel?: boolean;
  /** Also compute the maximum a posteriori point (default false). */
  computeMode?: boolean;
  /** Cap on concurrent workers (default os.availableParallelism()). */
  maxWorkers?: number;
  /** Called with each chain as soon as it finishes (e.g. to store it before the others end). */
  onChainDone?(chain: ChainResult): void;
  /**
   * Chains finished by an earlier attempt of the same fit (same spec and settings): they are kept
   * and only the missing chains run. Chains are deterministic in (seed, chain index), so the result
   * equals an uninterrupted fit.
   */
  resume?: ChainResult[];
  /**
   * Compute the summary (summaries, diagnostics, verdict — seconds for millions of draws) on one
   * of the chain worker threads instead of the calling thread (default false; ignored when
   * `parallel` is false).
   */
  summaryOnWorker?: boolean;
}

/** Seed stream of the dispersed starts; chains use their own streams inside the samplers. */
const STARTS_STREAM = 0x5eed;

export class FitCancelledError extends Error {
  constructor() {
    super('The fit was cancelled.');
    this.name = 'AbortError';
  }
}

export async function runFit(
  spec: TargetSpec,
  settingsIn: Partial<FitSettings>,
  opts: RunFitOptions = {},
): Promise<FitResult> {
  const started = performance.now();
  const settings = fitSettingsSchema.parse(settingsIn);
  if (opts.signal?.aborted) throw new FitCancelledError();

  const p = await preparedFor(spec);
  const target = p.target;
  if (target.dim > FIT_LIMITS.dimension) {
    throw new Error(`The model has ${target.dim} unknowns; a fit allows at most ${FIT_LIMITS.dimension}.`);
  }

  const starts = dispersedStarts(p, settings.chains, new Rng(settings.seed, STARTS_STREAM));

  const plan = await choosePlan(spec, p, settings, starts, opts);
  const { sampler, samplerReason } = plan;
  if (plan.starts) for (let c = 0; c < starts.length; c++) starts[c] = Float64Array.from(plan.starts[c]);

  const jobs: ChainJob[] = starts.map((start, chain) => ({
    spec,
    sampler,
    start: Array.from(start),
    warmup: settings.warmup,
    draws: settings.draws,
    seed: settings.seed,
    chain,
  }));

  const kept = new Map<number, ChainResult>();
  for (const c of opts.resume ?? []) {
    const dimOk = c.draws.length === settings.draws * target.dim;
    if (c.chain < 0 || c.chain >= settings.chains || !dimOk) {
      throw new Error(`A resumed chain (${c.chain + 1}) does not match this fit's settings or model.`);
    }
    kept.set(c.chain, c);
  }
  const reporter = makeProgressReporter(settings, opts.onProgress);
  const progress: ChainProgress = (chain, phase, iteration) => {
    reporter(chain, phase, iteration);
    if (phase === 'done') opts.onChainDone?.(finished.get(chain)!);
  };
  const finished = new Map<number, ChainResult>();
  const todo = jobs.filter((j) => !kept.has(j.chain));
  const ran =
    opts.parallel === false
      ? await runInProcess(p, todo, progress, opts.signal, finished)
      : await runOnWorkers(todo, progress, opts.signal, opts.maxWorkers, finished);
  // Every kept draw was checked against every constraint by the sampler as it was produced
  // (samplers/index.ts makeDrawCheck); resumed chains were checked when they first ran.
  const chains = [...kept.values(), ...ran].sort((a, b) => a.chain - b.chain);

  const summary =
    opts.summaryOnWorker && opts.parallel !== false
      ? await summariseOnWorker(spec, chains, settings, sampler, samplerReason)
      : summarise(p, chains, settings, sampler, samplerReason);
  if (opts.computeMode) {
    // Absent when the Newton iterations did not converge (the draws are still summarised).
    const mode = findMode(p);
    if (mode.converged && mode.theta.every(Number.isFinite)) {
      summary.mode = Object.fromEntries(target.names.map((n, i) => [n, mode.theta[i]]));
    }
  }
  summary.seconds = (performance.now() - started) / 1000;
  return {
    unknownNames: target.names.slice(),
    derivedNames: target.derived?.names.slice() ?? [],
    chains,
    summary: fitSummarySchema.parse(summary),
  };
}

/* ------------------------------------------------------------------------------------------ */
/* One chain at a time: the pieces of runFit for callers that spread a fit's chains out         */
/* ------------------------------------------------------------------------------------------ */

/** What every chain of a fit shares beyond its settings: the engine, decided once per fit. */
export interface FitPlan {
  sampler: SamplerName;
  samplerReason: string;
  /** Where the automatic choice starts each chain (from its pilots); absent: the fit's dispersed starts. */
  starts?: number[][];
}

type PlanOptions = Pick<RunFitOptions, 'signal' | 'parallel' | 'maxWorkers'>;

/** The engine of a fit: the settings' engine, or the automatic choice by pilots (deterministic in the seed). */
async function choosePlan(spec: TargetSpec, p: PreparedTarget, settings: FitSettings, starts: Float64Array[], opts: PlanOptions): Promise<FitPlan> {
  if (settings.sampler !== 'auto') return { sampler: settings.sampler, samplerReason: `Chosen in the fit settings (${settings.sampler}).` };
  // Decided once per fit, before any chain starts: every chain runs the same engine. Pilot chains
  // run like the fit's chains (worker threads unless parallel is false) and are never returned.
  const choice = await chooseEngine(
    p,
    {
      start: starts[0],
      fitIterations: settings.chains * (settings.warmup + settings.draws),
      evalCost: evaluationCostOf(spec, p.target.dim),
      chains: settings.chains,
      seed: settings.seed,
    },
    (pilots) =>
      Promise.all(
        pilots.map(async (pl) => {
          const job: ChainJob = { spec, sampler: pl.engine, start: Array.from(pl.start), warmup: pl.warmup, draws: pl.draws, seed: settings.seed, chain: pl.chain };
          const none: ChainProgress = () => {};
          try {
            const [out] =
              opts.parallel === false
                ? await runInProcess(p, [job], none, opts.signal, new Map())
                : await runOnWorkers([job], none, opts.signal, opts.maxWorkers, new Map());
            return out as ChainResult | Error;
          } catch (e) {
            if (opts.signal?.aborted || (e instanceof Error && e.name === 'AbortError')) throw new FitCancelledError();
            return e instanceof Error ? e : new Error(String(e));
          }
        }),
      ),
  );
  return { sampler: choice.sampler, samplerReason: choice.reason, ...(choice.starts ? { starts: choice.starts.map((s) => Array.from(s)) } : {}) };
}

async function preparedWithStarts(spec: TargetSpec, settings: FitSettings) {
  const p = await preparedFor(spec);
  if (p.target.dim > FIT_LIMITS.dimension) {
    throw new Error(`The model has ${p.target.dim} unknowns; a fit allows at most ${FIT_LIMITS.dimension}.`);
  }
  return { p, starts: dispersedStarts(p, settings.chains, new Rng(settings.seed, STARTS_STREAM)) };
}

/** The engine runFit would use for these settings (the same pilots, so the same answer). */
export async function planFit(spec: TargetSpec, settingsIn: Partial<FitSettings>, opts: PlanOptions = {}): Promise<FitPlan> {
  const settings = fitSettingsSchema.parse(settingsIn);
  const { p, starts } = await preparedWithStarts(spec, settings);
  return choosePlan(spec, p, settings, starts, opts);
}

/**
 * One chain of a fit, alone: the same start (the fit's dispersed starts, drawn from the seed) and
 * the same (seed, chain index), so its draws equal that chain of runFit with the same plan.
 */
export async function runFitChain(
  spec: TargetSpec,
  settingsIn: Partial<FitSettings>,
  chain: number,
  plan: FitPlan,
  opts: Pick<RunFitOptions, 'signal' | 'parallel' | 'onProgress'> = {},
): Promise<ChainResult> {
  const settings = fitSettingsSchema.parse(settingsIn);
  if (opts.signal?.aborted) throw new FitCancelledError();
  if (!Number.isInteger(chain) || chain < 0 || chain >= settings.chains) throw new Error(`Chain ${chain + 1} is not a chain of this fit.`);
  const { p, starts } = await preparedWithStarts(spec, settings);
  const job: ChainJob = { spec, sampler: plan.sampler, start: plan.starts?.[chain] ?? Array.from(starts[chain]), warmup: settings.warmup, draws: settings.draws, seed: settings.seed, chain };
  const progress = makeProgressReporter(settings, opts.onProgress);
  const finished = new Map<number, ChainResult>();
  const [out] = opts.parallel === false ? await runInProcess(p, [job], progress, opts.signal, finished) : await runOnWorkers([job], progress, opts.signal, 1, finished);
  return out;
}

/**
 * Summaries, diagnostics and verdict of chains run apart (runFitChain), on a pooled worker thread
 * unless `onWorker` is false. The summary's settings name the chains given.
 */
export async function summariseFitChains(
  spec: TargetSpec,
  settingsIn: Partial<FitSettings>,
  chainsIn: ChainResult[],
  plan: FitPlan,
  opts: { onWorker?: boolean } = {},
): Promise<FitResult> {
  const started = performance.now();
  const settings = fitSettingsSchema.parse({ ...settingsIn, chains: chainsIn.length });
  const p = await preparedFor(spec);
  const chains = chainsIn.slice().sort((a, b) => a.chain - b.chain);
  const summary =
    opts.onWorker === false
      ? summarise(p, chains, settings, plan.sampler, plan.samplerReason)
      : await summariseOnWorker(spec, chains, settings, plan.sampler, plan.samplerReason);
  summary.seconds = (performance.now() - started) / 1000;
  return {
    unknownNames: p.target.names.slice(),
    derivedNames: p.target.derived?.names.slice() ?? [],
    chains,
    summary: fitSummarySchema.parse(summary),
  };
}

/* ------------------------------------------------------------------------------------------ */
/* Progress                                                                                     */
/* ------------------------------------------------------------------------------------------ */

type ChainProgress = (chain: number, phase: 'warmup' | 'sampling' | 'done', iteration: number) => void;

/**
 * Turns the samplers' (phase, iteration) calls — iteration is the 0-based index over warm-up and
 * sampling together, as the samplers count — into FitProgress records whose `iteration` is the
 * number of iterations completed out of `total` = warm-up + draws.
 */
function makeProgressReporter(settings: FitSettings, onProgress?: (p: FitProgress) => void): ChainProgress {
  const total = settings.warmup + settings.draws;
  const startedAt = new Map<number, number>();
  return (chain, phase, iteration) => {
    if (!onProgress) return;
    const now = performance.now();
    if (!startedAt.has(chain)) startedAt.set(chain, now);
    const overall = phase === 'done' ? total : Math.min(total, iteration + 1);
    const seconds = (now - startedAt.get(chain)!) / 1000;
    onProgress({
      chain,
      phase,
      iteration: overall,
      total,
      itersPerSecond: seconds > 0 ? overall / seconds : 0,
    });
  };
}

/* ------------------------------------------------------------------------------------------ */
/* Running chains                                                                               */
/* ------------------------------------------------------------------------------------------ */

async function runInProcess(
  p: PreparedTarget,
  jobs: ChainJob[],
  progress: ChainProgress,
  signal: AbortSignal | undefined,
  finished: Map<number, ChainResult>,
): Promise<ChainResult[]> {
  const out: ChainResult[] = [];
  for (const job of jobs) {
    // Let the event loop run between chains so a cancel from outside can land.
    await new Promise((r) => setImmediate(r));
    if (signal?.aborted) throw new FitCancelledError();
    progress(job.chain, 'warmup', -1);
    try {
      const result = runChainOnPrepared(p, job, (phase, it) => progress(job.chain, phase, it), signal);
      finished.set(job.chain, result);
      out.push(result);
    } catch (e) {
      if (signal?.aborted || (e instanceof Error && e.name === 'AbortError')) throw new FitCancelledError();
      throw e;
    }
    progress(job.chain, 'done', 0);
  }
  return out;
}

function rebuildError(err: { name: string; message: string; messages?: unknown; conflicting?: unknown }): Error {
  const e = new Error(err.message) as Error & { messages?: unknown; conflicting?: unknown };
  e.name = err.name;
  if (err.messages !== undefined) e.messages = err.messages;
  if (err.conflicting !== undefined) e.conflicting = err.conflicting;
  return e;
}

const WORKER_BOOT = new URL('./fit-worker-boot.mjs', import.meta.url);

type WorkerMessage =
  | { type: 'summary'; summary: FitSummary }
  | { type: 'progress'; chain: number; phase: 'warmup' | 'sampling'; iteration: number }
  | { type: 'done'; result: ChainResult }
  | { type: 'error'; error: { name: string; message: string; messages?: unknown; conflicting?: unknown } };

/**
 * Worker threads kept between fits: starting a thread and its TypeScript loader costs far more
 * than a small chain, so idle workers wait (unref'd: they never keep the process alive) for the
 * next chain. At most `cap` workers exist at once across all fits of the process; chains beyond
 * that wait their turn.
 */
class ChainWorkerPool {
  private idle: Worker[] = [];
  private live = new Set<Worker>();
  private waiting: Array<(w: Worker) => void> = [];

  constructor(readonly cap: number) {}

  acquire(): Promise<Worker> {
    const w = this.idle.pop();
    if (w) {
      w.ref();
      return Promise.resolve(w);
    }
    if (this.live.size < this.cap) return Promise.resolve(this.spawn());
    return new Promise((resolve) => this.waiting.push(resolve));
  }

  release(w: Worker): void {
    if (!this.live.has(w)) return;
    const next = this.waiting.shift();
    if (next) return next(w);
    w.unref();
    this.idle.push(w);
  }

  /** Terminates a worker (cancelled or broken) and lets a waiting chain start a fresh one. */
  discard(w: Worker): void {
    if (!this.live.delete(w)) return;
    this.idle = this.idle.filter((x) => x !== w);
    void w.terminate();
    const next = this.waiting.shift();
    if (next) next(this.spawn());
  }

  /** Terminates every worker (for shutdown and tests). */
  async close(): Promise<void> {
    const all = [...this.live];
    this.live.clear();
    this.idle = [];
    await Promise.all(all.map((w) => w.terminate()));
  }

  private spawn(): Worker {
    const w = new Worker(WORKER_BOOT, { workerData: { slacklineFitWorker: true } });
    // A worker that dies while idle leaves the pool quietly; a busy one is reported by its job.
    w.on('error', () => this.discard(w));
    w.on('exit', () => {
      this.live.delete(w);
      this.idle = this.idle.filter((x) => x !== w);
    });
    this.live.add(w);
    return w;
  }
}

let sharedPool: ChainWorkerPool | null = null;

function pool(): ChainWorkerPool {
  sharedPool ??= new ChainWorkerPool(Math.max(1, os.availableParallelism()));
  return sharedPool;
}

/** Stops the fit worker threads kept between fits (they are unref'd, so this is optional). */
export async function closeFitWorkers(): Promise<void> {
  const p = sharedPool;
  sharedPool = null;
  await p?.close();
}

/**
 * Posts `request` to a pooled worker and waits for the answer `pick` recognises (or an error
 * message). The worker goes back to the pool after an answer, is dropped when `signal` aborts,
 * and a worker that errors or exits rejects with `what` named.
 */
function askWorker<T>(
  w: Worker,
  request: unknown,
  pick: (msg: WorkerMessage) => { value: T } | undefined,
  what: string,
  opts: { onMessage?: (msg: WorkerMessage) => void; signal?: AbortSignal } = {},
): Promise<T> {
  const { onMessage: observe, signal } = opts;
  return new Promise<T>((resolve, reject) => {
    const cleanup = () => {
      w.off('message', onMessage);
      w.off('error', onError);
      w.off('exit', onExit);
      signal?.removeEventListener('abort', onAbort);
    };
    const onMessage = (msg: WorkerMessage) => {
      observe?.(msg);
      const answer = pick(msg);
      if (answer) {
        cleanup();
        pool().release(w);
        resolve(answer.value);
      } else if (msg.type === 'error') {
        cleanup();
        pool().release(w);
        reject(rebuildError(msg.error));
      }
    };
    const onError = (e: Error) => {
      cleanup();
      reject(e);
    };
    const onExit = (code: number) => {
      cleanup();
      reject(new Error(`${what} stopped with exit code ${code}.`));
    };
    const onAbort = () => {
      cleanup();
      pool().discard(w);
      reject(new FitCancelledError());
    };
    w.on('message', onMessage);
    w.on('error', onError);
    w.on('exit', onExit);
    signal?.addEventListener('abort', onAbort);
    w.postMessage(request);
  });
}

/** Runs one chain on a pooled worker. */
function runJobOnWorker(w: Worker, job: ChainJob, progress: ChainProgress, signal?: AbortSignal): Promise<ChainResult> {
  progress(job.chain, 'warmup', -1);
  return askWorker<ChainResult>(
    w,
    { type: 'run', job },
    (msg) => (msg.type === 'done' ? { value: msg.result } : undefined),
    "A chain's worker thread",
    { signal, onMessage: (msg) => msg.type === 'progress' && progress(msg.chain, msg.phase, msg.iteration) },
  );
}

/** Runs the jobs on pooled worker threads, at most `maxWorkers` of this fit's chains at once. */
async function runOnWorkers(
  jobs: ChainJob[],
  progress: ChainProgress,
  signal: AbortSignal | undefined,
  maxWorkers: number | undefined,
  finished: Map<number, ChainResult>,
): Promise<ChainResult[]> {
  if (jobs.length === 0) return [];
  const lanes = Math.max(1, Math.min(jobs.length, maxWorkers ?? os.availableParallelism()));
  const queue = jobs.slice();
  const results: ChainResult[] = [];
  // Stops the other chains at once when one fails or the caller cancels.
  const stop = new AbortController();
  const onOuterAbort = () => stop.abort();
  signal?.addEventListener('abort', onOuterAbort);
  if (signal?.aborted) stop.abort();
  let firstError: unknown = null;
  const lane = async () => {
    while (queue.length > 0 && !stop.signal.aborted) {
      const job = queue.shift()!;
      const w = await pool().acquire();
      if (stop.signal.aborted) {
        pool().release(w);
        return;
      }
      try {
        const result = await runJobOnWorker(w, job, progress, stop.signal);
        finished.set(job.chain, result);
        results.push(result);
      } catch (e) {
        if (!stop.signal.aborted) {
          firstError = e;
          stop.abort();
        }
        return;
      }
      progress(job.chain, 'done', 0);
    }
  };
  try {
    await Promise.all(Array.from({ length: lanes }, lane));
  } finally {
    signal?.removeEventListener('abort', onOuterAbort);
  }
  if (firstError) throw firstError;
  if (signal?.aborted) throw new FitCancelledError();
  return results;
}


/** The summary computed on a pooled worker thread (the chains are copied to it). */
async function summariseOnWorker(spec: TargetSpec, chains: ChainResult[], settings: FitSettings, sampler: SamplerName, samplerReason: string): Promise<FitSummary> {
  const w = await pool().acquire();
  return askWorker<FitSummary>(
    w,
    { type: 'summarise', spec, chains, settings, sampler, samplerReason },
    (msg) => (msg.type === 'summary' ? { value: msg.summary } : undefined),
    "The summary's worker thread",
  );
}
