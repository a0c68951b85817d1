/**
 * Posterior summary of one quantity: mean, standard deviation, 5/50/95% quantiles, R̂, bulk- and
 * tail-ESS and Monte Carlo standard errors (see convergence.ts for the methods and sources).
 *
 * Conventions (ours):
 * - sd is the sample standard deviation of all draws pooled (divisor S − 1);
 * - quantiles are definition 7 of "Sample quantiles in statistical packages" (The American
 *   Statistician 1996) on the pooled draws;
 * - a quantity that is constant over every draw (a fixed coordinate, say) is known exactly: R̂ = 1,
 *   ESS = the number of draws, every MCSE = 0;
 * - an R̂ that is infinite (every split chain constant, but at different values: chains that never
 *   moved) is reported as RHAT_STUCK, because JSON and the result schema carry finite numbers only;
 *   an ESS that cannot be computed is reported as 0, so the verdict flags it.
 */
import type { QuantitySummary } from '../../../shared/fit';
import {
  essBasic,
  mcseQuantileFromEss,
  quantileSorted,
  rankNormalize,
  rhatBasic,
  sortedCopy,
  splitChains,
  type Chains,
} from './convergence';

/** Stand-in for an infinite R̂ (chains stuck at different values). */
export const RHAT_STUCK = 1e6;

export class NonFiniteDrawError extends Error {
  constructor(
    readonly quantity: string,
    readonly chain: number,
    readonly iteration: number,
    readonly value: number,
  ) {
    super(
      `${quantity} is ${value} at chain ${chain + 1}, draw ${iteration + 1}: a summary needs finite values`,
    );
    this.name = 'NonFiniteDrawError';
  }
}

export function summarizeQuantity(
  name: string,
  kind: 'unknown' | 'derived',
  chains: Chains,
): QuantitySummary {
  let total = 0;
  for (let c = 0; c < chains.length; c++) {
    const ch = chains[c];
    for (let i = 0; i < ch.length; i++) {
      if (!Number.isFinite(ch[i])) throw new NonFiniteDrawError(name, c, i, ch[i]);
    }
    total += ch.length;
  }
  const all = new Float64Array(total);
  let k = 0;
  for (const ch of chains) for (let i = 0; i < ch.length; i++) all[k++] = ch[i];
  let m = 0;
  for (let i = 0; i < total; i++) m += all[i];
  m /= total;
  let ss = 0;
  for (let i = 0; i < total; i++) ss += (all[i] - m) * (all[i] - m);
  const sd = total > 1 ? Math.sqrt(ss / (total - 1)) : 0;
  const sorted = sortedCopy(all);
  const q5 = quantileSorted(sorted, 0.05);
  const q50 = quantileSorted(sorted, 0.5);
  const q95 = quantileSorted(sorted, 0.95);

  if (sorted[0] === sorted[total - 1]) {
    return {
      name, kind, mean: m, sd: 0, q5, q50, q95,
      rhat: 1, essBulk: total, essTail: total,
      mcseMean: 0, mcseQ5: 0, mcseQ50: 0, mcseQ95: 0,
    };
  }

  const finiteOr = (v: number, fallback: number) => (Number.isFinite(v) ? v : fallback);
  // Each transform is computed once and shared (same definitions as convergence.ts):
  // rank-normalised split chains → bulk R̂ and bulk-ESS; folded → tail R̂;
  // split chains → ESS of the mean; quantile indicators → tail-ESS and the quantile MCSEs.
  const split = splitChains(chains);
  const z = rankNormalize(split);
  const folded = rankNormalize(split.map((c) => c.map((v) => Math.abs(v - q50))));
  const rb = rhatBasic(z);
  const rt = rhatBasic(folded);
  let r = Number.isNaN(rb) ? rt : Number.isNaN(rt) ? rb : Math.max(rb, rt);
  if (r === Infinity) r = RHAT_STUCK;
  const indicatorEss = (q: number) => essBasic(split.map((c) => c.map((v) => (v <= q ? 1 : 0))));
  const e5 = indicatorEss(q5);
  const e50 = indicatorEss(q50);
  const e95 = indicatorEss(q95);
  const eMean = essBasic(split);
  return {
    name,
    kind,
    mean: m,
    sd,
    q5,
    q50,
    q95,
    // R̂ is NaN only with fewer than two split chains of two draws each: then nothing can be said.
    rhat: finiteOr(r, RHAT_STUCK),
    essBulk: finiteOr(essBasic(z), 0),
    essTail: finiteOr(Math.min(e5, e95), 0),
    mcseMean: finiteOr(sd / Math.sqrt(eMean), sd),
    mcseQ5: finiteOr(mcseQuantileFromEss(sorted, 0.05, e5), sd),
    mcseQ50: finiteOr(mcseQuantileFromEss(sorted, 0.5, e50), sd),
    mcseQ95: finiteOr(mcseQuantileFromEss(sorted, 0.95, e95), sd),
  };
}
