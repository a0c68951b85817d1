/**
 * Runs a few chains of a target from dispersed starts (no test framework here, so the benchmark and
 * scripts can use it too).
 */
import type { ChainOutput, ModelTarget, SamplerName } from '../../../server/engine/types';
import { dispersedStarts, prepareTarget, type PreparedTarget } from '../../../server/engine/geometry';
import { sampleChain } from '../../../server/engine/samplers';
import { Rng } from '../../../server/engine/rng';

export interface Run {
  p: PreparedTarget;
  outs: ChainOutput[];
  draws: number;
}

export function runChains(target: ModelTarget, sampler: SamplerName, opts: { chains?: number; warmup: number; draws: number; seed: number }): Run {
  const p = prepareTarget(target);
  const chains = opts.chains ?? 2;
  const starts = dispersedStarts(p, chains, new Rng(opts.seed, 999));
  const outs = starts.map((s, c) => sampleChain(p, sampler, s, { warmup: opts.warmup, draws: opts.draws, seed: opts.seed, chain: c }));
  return { p, outs, draws: opts.draws };
}

export function column(run: Run, j: number, f: (x: number) => number = (x) => x): Float64Array[] {
  const dim = run.p.target.dim;
  return run.outs.map((o) => Float64Array.from({ length: run.draws }, (_, k) => f(o.draws[k * dim + j])));
}

