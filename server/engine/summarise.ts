/**
 * The summary of a fit from its chains: per-quantity summaries, run diagnostics and the verdict.
 * Pure and synchronous; runFit calls it on the calling thread or, with `summaryOnWorker`, on one of
 * its chain worker threads (fit-worker.ts answers a 'summarise' message with it).
 */
import type { FitSettings, FitSummary, QuantitySummary } from '../../shared/fit';
import type { ChainResult, SamplerName } from './types';
import type { PreparedTarget } from './geometry';
import { efmi, judgeRun, summarizeQuantity } from './diagnostics';

/* ------------------------------------------------------------------------------------------ */
/* Checks and summaries                                                                         */
/* ------------------------------------------------------------------------------------------ */

/** Column `j` of a row-major draws × width matrix. */
function column(data: Float64Array, width: number, j: number): Float64Array {
  const n = data.length / width;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = data[i * width + j];
  return out;
}

export function summarise(
  p: PreparedTarget,
  chains: ChainResult[],
  settings: FitSettings,
  sampler: SamplerName,
  samplerReason: string,
): FitSummary {
  const t = p.target;
  const quantities: QuantitySummary[] = [];
  for (let j = 0; j < t.dim; j++) {
    quantities.push(summarizeQuantity(t.names[j], 'unknown', chains.map((c) => column(c.draws, t.dim, j))));
  }
  const dn = t.derived?.names ?? [];
  for (let j = 0; j < dn.length; j++) {
    quantities.push(summarizeQuantity(dn[j], 'derived', chains.map((c) => column(c.derivedDraws, dn.length, j))));
  }

  let divergences = 0;
  let rejectedSteps = 0;
  let acceptSum = 0;
  let acceptCount = 0;
  for (const c of chains) {
    for (let i = 0; i < c.divergent.length; i++) divergences += c.divergent[i];
    // A missing `rejected` (hit-and-run, chains stored before it existed) reads as zeros.
    if (c.rejected) for (let i = 0; i < c.rejected.length; i++) rejectedSteps += c.rejected[i];
    for (let i = 0; i < c.acceptStat.length; i++) {
      acceptSum += c.acceptStat[i];
      acceptCount++;
    }
  }
  const stepSizes = chains.map((c) => c.stepSize).filter(Number.isFinite);
  const efmis = chains.every((c) => c.energy && c.energy.length > 1) ? chains.map((c) => efmi(c.energy!)) : undefined;
  const fps = chains.map((c) => c.factorizationsPerStep).filter((v): v is number => Number.isFinite(v));

  let worstRhat = quantities[0];
  let worstEss = quantities[0];
  for (const q of quantities) {
    if (q.rhat > worstRhat.rhat) worstRhat = q;
    if (Math.min(q.essBulk, q.essTail) < Math.min(worstEss.essBulk, worstEss.essTail)) worstEss = q;
  }
  const maxRhat = quantities.length ? Math.max(...quantities.map((q) => q.rhat)) : 1;
  const minEssBulk = quantities.length ? Math.min(...quantities.map((q) => q.essBulk)) : 0;
  const minEssTail = quantities.length ? Math.min(...quantities.map((q) => q.essTail)) : 0;

  const verdict = judgeRun({
    chains: settings.chains,
    draws: settings.draws,
    divergences,
    rejectedSteps,
    maxRhat,
    minEssBulk,
    minEssTail,
    worstRhatName: worstRhat?.name,
    worstEssName: worstEss?.name,
    efmi: efmis?.filter(Number.isFinite),
  });

  return {
    quantities,
    diagnostics: {
      divergences,
      rejectedSteps,
      acceptance: acceptCount ? acceptSum / acceptCount : 0,
      // 0 stands for "not applicable" (samplers without a step size, such as hit-and-run).
      stepSize: stepSizes.length ? stepSizes.reduce((a, b) => a + b, 0) / stepSizes.length : 0,
      maxRhat,
      minEssBulk,
      minEssTail,
      ...(efmis ? { efmi: efmis.map((v) => (Number.isFinite(v) ? v : 0)) } : {}),
      ...(fps.length ? { factorizationsPerStep: fps.reduce((a, b) => a + b, 0) / fps.length } : {}),
      samplerUsed: sampler,
      samplerReason,
    },
    verdict,
    settings,
    seconds: 0,
  };
}
