/**
 * Sampler benchmark: barrier-metric RHMC and rounded hit-and-run on the uniform simplex and the
 * order simplex in 50 dimensions. Records min(bulk, tail) ESS per draw over all coordinates (goal
 * for RHMC ≥ 0.3), metric factorisations per integrator step (goal ≤ 4), the adapted step size,
 * seconds, and the Cholesky kernel comparison behind linalg/cholesky.ts's choice.
 * Runnable alone: `npx tsx bench/rhmc.bench.ts` (the engine comparison is bench/samplers.bench.ts).
 */
import { fileURLToPath } from 'node:url';
import { dispersedStarts, prepareTarget } from '../server/engine/geometry';
import { sampleChain } from '../server/engine/samplers';
import { DEFAULT_RHMC, stepResultCounts } from '../server/engine/samplers/rhmc';
import { setCholeskyKernel } from '../server/engine/linalg/cholesky';
import { essBulk, essTail } from '../server/engine/diagnostics';
import { Rng } from '../server/engine/rng';
import type { ModelTarget, SamplerName } from '../server/engine/types';
import { gaussianOnSimplexTarget, orderedGroupsTarget, orderedMeansTarget, orderSimplexTarget, uniformSimplexTarget } from '../tests/unit/samplers/targets';

const CHAINS = 2;

function measure(target: ModelTarget, sampler: SamplerName, warmup: number, draws: number, seed: number) {
  const p = prepareTarget(target);
  const starts = dispersedStarts(p, CHAINS, new Rng(seed, 999));
  const t0 = performance.now();
  const outs = starts.map((s, c) => sampleChain(p, sampler, s, { warmup, draws, seed, chain: c }));
  const seconds = (performance.now() - t0) / 1000;
  const dim = target.dim;
  let minEss = Infinity;
  for (let j = 0; j < dim; j++) {
    const ch = outs.map((o) => Float64Array.from({ length: draws }, (_, k) => o.draws[k * dim + j]));
    minEss = Math.min(minEss, essBulk(ch), essTail(ch));
  }
  const total = CHAINS * draws;
  const div = outs.reduce((s, o) => s + o.divergent.reduce((a, b) => a + b, 0), 0);
  const rej = outs.reduce((s, o) => s + (o.rejected ?? new Uint8Array(0)).reduce((a, b) => a + b, 0), 0);
  return {
    essPerDraw: minEss / total,
    seconds,
    stepSize: outs.reduce((s, o) => s + o.stepSize, 0) / CHAINS,
    fps: outs.reduce((s, o) => s + (o.factorizationsPerStep ?? NaN), 0) / CHAINS,
    divergentFraction: div / total,
    rejectedFraction: rej / total,
    acceptance: outs.reduce((s, o) => s + o.acceptStat.reduce((a, b) => a + b, 0), 0) / total,
  };
}

export async function run(): Promise<Record<string, number | string>> {
  const out: Record<string, number | string> = { chains: CHAINS };
  const cases: [string, ModelTarget][] = [
    ['simplex50', uniformSimplexTarget(50)],
    ['order50', orderSimplexTarget(50)],
  ];
  const W = 300;
  const D = 500;
  out.rhmcWarmupDraws = `${W}/${D}`;
  for (const [name, t] of cases) {
    for (const k of Object.keys(stepResultCounts)) delete stepResultCounts[k];
    const r = measure(t, 'rhmc', W, D, 2026);
    out[`${name}.rhmc.essPerDraw`] = r.essPerDraw;
    out[`${name}.rhmc.factorizationsPerStep`] = r.fps;
    out[`${name}.rhmc.stepSize`] = r.stepSize;
    out[`${name}.rhmc.acceptance`] = r.acceptance;
    out[`${name}.rhmc.divergentFraction`] = r.divergentFraction;
    out[`${name}.rhmc.rejectedFraction`] = r.rejectedFraction;
    out[`${name}.rhmc.seconds`] = r.seconds;
    const steps = Object.values(stepResultCounts).reduce((a, b) => a + b, 0);
    out[`${name}.rhmc.failedStepFraction`] = steps > 0 ? 1 - (stepResultCounts.ok ?? 0) / steps : NaN;
    const h = measure(t, 'hitrun', W, D, 2026);
    out[`${name}.hitrun.essPerDraw`] = h.essPerDraw;
    out[`${name}.hitrun.seconds`] = h.seconds;
  }
  // Λ adaptation: likelihood curvature (default) against inverse warm-up variances, on two
  // likelihood-dominated constrained targets.
  const y = [0.8, 1.1, 0.9, 1.6, 2.2, 2.0, 2.9, 3.1, 2.7, 3.8];
  const metricCases: [string, ModelTarget][] = [
    ['ordered10', orderedMeansTarget({ y, sigma: 0.3 })],
    ['gaussOnSimplex10', gaussianOnSimplexTarget({ d: 10, centre: 0.08, sd: 0.03 })],
  ];
  for (const mode of ['curvature', 'variance'] as const) {
    DEFAULT_RHMC.metricAdaptation = mode;
    for (const [name, t] of metricCases) {
      const r = measure(t, 'rhmc', 300, 500, 5);
      out[`metric.${mode}.${name}.essPerDraw`] = r.essPerDraw;
      out[`metric.${mode}.${name}.seconds`] = r.seconds;
    }
  }
  DEFAULT_RHMC.metricAdaptation = 'curvature';
  // A realistic posterior: ordered group means with a shared scale (divergent share matters for the
  // run verdict, which flags any divergence; a rejected share above 10% is flagged too).
  const groups = orderedGroupsTarget({
    y: [
      [2.1, 2.9, 1.7, 2.5, 3.0, 2.2],
      [2.4, 2.0, 2.8, 1.9, 2.6, 2.3],
      [3.9, 4.4, 3.6, 4.1, 4.8, 3.7],
      [3.5, 4.0, 3.8, 4.6, 3.3, 4.2],
    ],
  });
  const g = measure(groups, 'rhmc', 400, 1000, 8);
  out['orderedGroups.rhmc.essPerDraw'] = g.essPerDraw;
  out['orderedGroups.rhmc.divergentFraction'] = g.divergentFraction;
  out['orderedGroups.rhmc.rejectedFraction'] = g.rejectedFraction;
  out['orderedGroups.rhmc.stepSize'] = g.stepSize;
  out['orderedGroups.rhmc.seconds'] = g.seconds;
  // Cholesky kernel: the same short RHMC run with ml-matrix's decomposition and with the in-place loop.
  const t = uniformSimplexTarget(50);
  setCholeskyKernel('ml-matrix');
  const ml = measure(t, 'rhmc', 60, 60, 7);
  setCholeskyKernel('inplace');
  const ip = measure(t, 'rhmc', 60, 60, 7);
  out['cholesky.mlMatrix.seconds'] = ml.seconds;
  out['cholesky.inplace.seconds'] = ip.seconds;
  out['cholesky.speedup'] = ml.seconds / ip.seconds;
  return out;
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  run().then((r) => {
    for (const [k, v] of Object.entries(r)) console.log(k.padEnd(40), typeof v === 'number' ? Number(v.toPrecision(4)) : v);
  });
}
