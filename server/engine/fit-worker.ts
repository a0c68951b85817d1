/**
 * One chain of a fit, runnable in-process or inside a worker thread.
 *
 * Targets hold closures and cannot cross threads, so a worker rebuilds the target from its
 * TargetSpec (compiling the program or importing the module factory), prepares it the same way the
 * main thread did (presolve is deterministic), and runs the chain from the start the main thread
 * drew. Same spec, same start, same seed and chain index ⇒ the same draws, on any thread.
 *
 * When loaded as a worker (see fit-worker-boot.mjs) it answers messages:
 *   in:  { type: 'run', job: ChainJob }
 *   out: { type: 'progress', chain, phase, iteration } … then { type: 'done', result } or
 *        { type: 'error', error: { name, message, messages? } }
 *   in:  { type: 'summarise', spec, chains, settings, sampler, samplerReason }
 *   out: { type: 'summary', summary } or { type: 'error', … }
 */
import { parentPort, workerData } from 'node:worker_threads';
import { pathToFileURL } from 'node:url';
import type { ChainResult, ModelTarget, SamplerName, TargetSpec } from './types';
import { prepareTarget, type PreparedTarget } from './geometry';
import { sampleChain } from './samplers';
import { compileProgram } from './compile';
import { compilePriorOnly } from './compile/predictive';
import { summarise } from './summarise';
import type { FitSettings } from '../../shared/fit';

export interface ChainJob {
  spec: TargetSpec;
  sampler: SamplerName;
  /** Start in the prepared target's reduced coordinates z. */
  start: number[];
  warmup: number;
  draws: number;
  seed: number;
  chain: number;
}

/** Builds the model target a spec describes. */
export async function buildTarget(spec: TargetSpec): Promise<ModelTarget> {
  if (spec.kind === 'program') return spec.priorOnly ? compilePriorOnly(spec.source, spec.tables) : compileProgram(spec.source, spec.tables);
  const url = spec.modulePath.startsWith('file:') ? spec.modulePath : pathToFileURL(spec.modulePath).href;
  const mod = (await import(/* @vite-ignore */ url)) as Record<string, unknown>;
  const factory = mod[spec.exportName];
  if (typeof factory !== 'function') {
    throw new Error(`${spec.modulePath} has no exported function "${spec.exportName}"`);
  }
  return (await (factory as (args: unknown) => ModelTarget | Promise<ModelTarget>)(spec.args)) as ModelTarget;
}

const preparedCache = new Map<string, Promise<PreparedTarget>>();

/** Builds and prepares a target once per spec and thread. */
export function preparedFor(spec: TargetSpec): Promise<PreparedTarget> {
  const key = specKey(spec);
  let p = preparedCache.get(key);
  if (!p) {
    p = buildTarget(spec).then((t) => prepareTarget(t));
    // Keep the few most recent targets (a worker thread serves many fits).
    if (preparedCache.size >= 4) preparedCache.delete(preparedCache.keys().next().value!);
    preparedCache.set(key, p);
    p.catch(() => preparedCache.delete(key));
  }
  return p;
}

function specKey(spec: TargetSpec): string {
  if (spec.kind === 'module') return JSON.stringify(['module', spec.modulePath, spec.exportName, spec.args]);
  // Tables hold typed arrays: serialise their values explicitly.
  const tables = Object.entries(spec.tables).map(([name, t]) => [
    name,
    t.rows,
    Object.entries(t.columns).map(([c, col]) => [c, col.type, Array.from(col.values), col.levels ?? null]),
  ]);
  return JSON.stringify(['program', spec.source, tables, ...(spec.priorOnly ? ['prior-only'] : [])]);
}

/**
 * Runs one chain on a prepared target and evaluates the derived quantities per draw.
 * Synchronous apart from building the target.
 */
export function runChainOnPrepared(
  p: PreparedTarget,
  job: Omit<ChainJob, 'spec'>,
  onProgress?: (phase: 'warmup' | 'sampling', iteration: number) => void,
  signal?: AbortSignal,
): ChainResult {
  const out = sampleChain(p, job.sampler, Float64Array.from(job.start), {
    warmup: job.warmup,
    draws: job.draws,
    seed: job.seed,
    chain: job.chain,
    onProgress,
    signal,
  });
  const t = p.target;
  const derived = t.derived;
  const k = derived?.names.length ?? 0;
  const derivedDraws = new Float64Array(job.draws * k);
  if (derived && k > 0) {
    const theta = new Float64Array(t.dim);
    const row = new Float64Array(k);
    for (let i = 0; i < job.draws; i++) {
      theta.set(out.draws.subarray(i * t.dim, (i + 1) * t.dim));
      derived.evaluate(theta, row);
      derivedDraws.set(row, i * k);
    }
  }
  return { ...out, chain: job.chain, derivedDraws };
}

/* ------------------------------------------------------------------------------------------ */
/* Worker side                                                                                  */
/* ------------------------------------------------------------------------------------------ */

interface SummariseMessage {
  type: 'summarise';
  spec: TargetSpec;
  chains: ChainResult[];
  settings: FitSettings;
  sampler: SamplerName;
  samplerReason: string;
}

function serialiseError(e: unknown): { name: string; message: string; messages?: unknown; conflicting?: unknown } {
  if (e instanceof Error) {
    const extra = e as Error & { messages?: unknown; conflicting?: unknown };
    return { name: e.name, message: e.message, messages: extra.messages, conflicting: extra.conflicting };
  }
  return { name: 'Error', message: String(e) };
}

if (parentPort && (workerData as { slacklineFitWorker?: boolean } | undefined)?.slacklineFitWorker) {
  const port = parentPort;
  port.on('message', async (msg: { type: 'run'; job: ChainJob } | SummariseMessage) => {
    if (msg.type === 'summarise') {
      try {
        const p = await preparedFor(msg.spec);
        port.postMessage({ type: 'summary', summary: summarise(p, msg.chains, msg.settings, msg.sampler, msg.samplerReason) });
      } catch (e) {
        port.postMessage({ type: 'error', error: serialiseError(e) });
      }
      return;
    }
    if (msg.type !== 'run') return;
    const { job } = msg;
    try {
      const p = await preparedFor(job.spec);
      const result = runChainOnPrepared(p, job, (phase, iteration) =>
        port.postMessage({ type: 'progress', chain: job.chain, phase, iteration }),
      );
      const buffers = new Set<ArrayBuffer>();
      for (const a of [result.draws, result.divergent, result.rejected, result.acceptStat, result.derivedDraws, result.energy]) {
        if (a && a.buffer instanceof ArrayBuffer) buffers.add(a.buffer);
      }
      port.postMessage({ type: 'done', result }, [...buffers]);
    } catch (e) {
      port.postMessage({ type: 'error', error: serialiseError(e) });
    }
  });
}
