/**
 * Sampler entry points: one chain from a prepared target, and the automatic choice of method.
 */
import type { ChainOptions, ChainOutput, SamplerName } from '../types';
import type { PreparedTarget } from '../geometry';

/** Runs warm-up then keeps opts.draws draws; the returned draws are in θ coordinates. */
export function sampleChain(
  _p: PreparedTarget,
  _sampler: SamplerName,
  _start: Float64Array,
  _opts: ChainOptions,
): ChainOutput {
  throw new Error('not implemented');
}

/** Picks a sampler by the model's structure and says why in one sentence. */
export function chooseSampler(_p: PreparedTarget): { sampler: SamplerName; reason: string } {
  throw new Error('not implemented');
}
