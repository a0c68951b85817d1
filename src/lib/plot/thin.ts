/** Shaping draws for plots: even thinning, pooled ranks, rank histograms, kernel density. */

import { thinIndices } from '@shared/thin-indices';

export { thinIndices };

export function thin<T>(values: ArrayLike<T>, max: number): T[] {
  return thinIndices(values.length, max).map((k) => values[k]);
}

/**
 * Ranks (1-based) of every draw among all chains pooled; ties get their average rank.
 * Returns the ranks in the same chain/iteration layout.
 */
export function pooledRanks(chains: readonly (readonly number[])[]): number[][] {
  const all: { v: number; c: number; t: number }[] = [];
  chains.forEach((ch, c) => ch.forEach((v, t) => all.push({ v, c, t })));
  all.sort((p, q) => p.v - q.v);
  const out = chains.map((ch) => new Array<number>(ch.length));
  let k = 0;
  while (k < all.length) {
    let m = k;
    while (m + 1 < all.length && all[m + 1].v === all[k].v) m++;
    const avg = (k + m) / 2 + 1;
    for (let r = k; r <= m; r++) out[all[r].c][all[r].t] = avg;
    k = m + 1;
  }
  return out;
}

/**
 * Rank histogram per chain: pooled ranks split into `bins` equal-width bins over [1, N].
 * Under good mixing each chain's histogram is near flat at N / (chains · bins) per bin
 * (rank plots, "Rank-normalization, folding, and localization: an improved R̂", Bayesian
 * Analysis 16(2), 2021, §4.1).
 */
export function rankHistogram(chains: readonly (readonly number[])[], bins = 20): { chain: number; bin: number; count: number }[] {
  const ranks = pooledRanks(chains);
  const total = ranks.reduce((s, r) => s + r.length, 0);
  const out: { chain: number; bin: number; count: number }[] = [];
  ranks.forEach((r, c) => {
    const counts = new Array<number>(bins).fill(0);
    for (const rank of r) {
      const b = Math.min(bins - 1, Math.floor(((rank - 1) / total) * bins));
      counts[b]++;
    }
    counts.forEach((count, bin) => out.push({ chain: c + 1, bin: bin + 1, count }));
  });
  return out;
}
