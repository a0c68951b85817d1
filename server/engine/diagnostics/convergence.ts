/**
 * Convergence diagnostics for Markov chain output, following
 *
 *   "Rank-normalization, folding, and localization: an improved R̂ for assessing convergence of
 *   MCMC", Bayesian Analysis 16(2), 667–718, 2021 — below "Improved R̂, Bayesian Analysis 2021".
 *
 * Every function takes one quantity's draws as an array of chains (each chain an array of equal
 * length, in iteration order).
 *
 * - split chains: each chain is cut into its first and second half (the middle draw is dropped
 *   when the length is odd), so a trend within a chain shows up as disagreement between halves;
 * - rank normalisation: all draws pooled, ranked with ties averaged, z = Φ⁻¹((r − 3/8)/(S + 1/4))
 *   (the 3/8 offset, as in the paper, §4.1);
 * - R̂ = max(bulk R̂, tail R̂), bulk on the rank-normalised split chains, tail on the rank-normalised
 *   split chains of the folded draws |θ − median(θ)| (§4.2);
 * - ESS by the initial monotone sequence estimator ("Practical Markov chain Monte Carlo",
 *   Statistical Science 1992) on the autocorrelations combined across chains
 *   (§3.2 and the paper's Appendix A code), τ̂ floored at 1/log10(S) (the paper's antithetic guard);
 * - bulk-ESS on the rank-normalised split chains; tail-ESS = min of the ESS of the indicators
 *   I(θ ≤ q̂₀.₀₅) and I(θ ≤ q̂₀.₉₅) (§4.3);
 * - MCSE of the mean = sd / √ESS(mean) with the ESS of the untransformed split chains;
 * - MCSE of a quantile from the ESS of I(θ ≤ q̂_p) and a Beta(ESS·p + 1, ESS·(1 − p) + 1)
 *   interval on the ranks, mapped back through the sorted draws (§4.4).
 */
import qnorm from '@stdlib/stats-base-dists-normal-quantile';
import qbeta from '@stdlib/stats-base-dists-beta-quantile';
import { autocovariance } from './autocovariance';

export type Chains = ArrayLike<number>[];

/* ------------------------------------------------------------------------------------------ */
/* Small helpers                                                                                */
/* ------------------------------------------------------------------------------------------ */

function mean(x: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i];
  return s / x.length;
}

/** Sample variance with divisor n − 1. */
function variance(x: ArrayLike<number>): number {
  const m = mean(x);
  let s = 0;
  for (let i = 0; i < x.length; i++) s += (x[i] - m) * (x[i] - m);
  return s / (x.length - 1);
}

function pooled(chains: Chains): Float64Array {
  let total = 0;
  for (const c of chains) total += c.length;
  const out = new Float64Array(total);
  let k = 0;
  for (const c of chains) for (let i = 0; i < c.length; i++) out[k++] = c[i];
  return out;
}

function mapChains(chains: Chains, f: (v: number) => number): Float64Array[] {
  return chains.map((c) => {
    const out = new Float64Array(c.length);
    for (let i = 0; i < c.length; i++) out[i] = f(c[i]);
    return out;
  });
}

/**
 * Sample quantile, definition 7 of "Sample quantiles in statistical packages"
 * (The American Statistician 50(4), 1996): h = (n − 1)p, linear interpolation between the
 * order statistics x₍⌊h⌋₎ and x₍⌊h⌋+1₎ (0-based). `sorted` must be in ascending order.
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

export function sortedCopy(x: ArrayLike<number>): Float64Array {
  return Float64Array.from(x as ArrayLike<number>).sort();
}

/* ------------------------------------------------------------------------------------------ */
/* Splitting and rank normalisation                                                             */
/* ------------------------------------------------------------------------------------------ */

/** First and second half of every chain; the middle draw of an odd-length chain is dropped. */
export function splitChains(chains: Chains): Float64Array[] {
  const out: Float64Array[] = [];
  for (const c of chains) {
    const n = c.length;
    const half = Math.floor(n / 2);
    const a = new Float64Array(half);
    const b = new Float64Array(half);
    for (let i = 0; i < half; i++) {
      a[i] = c[i];
      b[i] = c[n - half + i];
    }
    out.push(a, b);
  }
  return out;
}

/**
 * Ranks of the pooled draws (1-based, ties get their average rank), mapped to normal scores
 * z = Φ⁻¹((r − 3/8)/(S + 1/4)) and returned with the same chain structure.
 */
export function rankNormalize(chains: Chains): Float64Array[] {
  const all = pooled(chains);
  const s = all.length;
  const order = new Uint32Array(s);
  for (let i = 0; i < s; i++) order[i] = i;
  order.sort((i, j) => all[i] - all[j]);
  const z = new Float64Array(s);
  let i = 0;
  while (i < s) {
    let j = i;
    while (j + 1 < s && all[order[j + 1]] === all[order[i]]) j++;
    const rank = (i + j) / 2 + 1; // average of 1-based ranks i+1 … j+1
    const score = qnorm((rank - 0.375) / (s + 0.25), 0, 1);
    for (let k = i; k <= j; k++) z[order[k]] = score;
    i = j + 1;
  }
  const out: Float64Array[] = [];
  let k = 0;
  for (const c of chains) {
    out.push(z.subarray(k, k + c.length).slice());
    k += c.length;
  }
  return out;
}

/* ------------------------------------------------------------------------------------------ */
/* R̂                                                                                           */
/* ------------------------------------------------------------------------------------------ */

/**
 * Classic potential scale reduction factor on the chains as given ("Inference from iterative
 * simulation using multiple sequences", Statistical Science 1992, in the form of Improved R̂,
 * Bayesian Analysis 2021, eq. 3–4): R̂ = √(((n − 1)/n · W + B/n) / W).
 * Returns NaN when the within-chain variance is zero and the chains agree, +∞ when it is zero
 * and they disagree.
 */
export function rhatBasic(chains: Chains): number {
  const m = chains.length;
  const n = chains[0]?.length ?? 0;
  if (m < 2 || n < 2) return NaN;
  const means = new Float64Array(m);
  let w = 0;
  for (let j = 0; j < m; j++) {
    means[j] = mean(chains[j]);
    w += variance(chains[j]);
  }
  w /= m;
  const b = n * variance(means);
  if (!(w > 0)) return b > 0 ? Infinity : NaN;
  return Math.sqrt((b / w + n - 1) / n);
}

/** Rank-normalised split-R̂ of the bulk (Improved R̂, Bayesian Analysis 2021, §4.1). */
export function rhatBulk(chains: Chains): number {
  return rhatBasic(rankNormalize(splitChains(chains)));
}

/** Rank-normalised split-R̂ of the folded draws |θ − median θ| (Improved R̂, Bayesian Analysis 2021, §4.2). */
export function rhatTail(chains: Chains): number {
  const med = quantileSorted(sortedCopy(pooled(chains)), 0.5);
  return rhatBasic(rankNormalize(splitChains(mapChains(chains, (v) => Math.abs(v - med)))));
}

/** R̂ = max(bulk, tail) (Improved R̂, Bayesian Analysis 2021, §4.2). */
export function rhat(chains: Chains): number {
  const a = rhatBulk(chains);
  const b = rhatTail(chains);
  if (Number.isNaN(a)) return b;
  if (Number.isNaN(b)) return a;
  return Math.max(a, b);
}

/* ------------------------------------------------------------------------------------------ */
/* Effective sample size                                                                        */
/* ------------------------------------------------------------------------------------------ */

/**
 * Effective sample size of chains as given (no splitting, no transformation), Improved R̂,
 * Bayesian Analysis 2021, §3.2 and Appendix A: autocorrelations combined across chains
 *   ρ̂_t = 1 − (W − mean_j acov_j(t)) / var⁺,  var⁺ = (n − 1)/n · W + var(chain means),
 * summed in pairs Γ_k = ρ̂_{2k} + ρ̂_{2k+1} until a pair is negative (the initial positive
 * sequence), made monotone (the initial monotone sequence; both from "Practical Markov chain
 * Monte Carlo", Statistical Science 1992), τ̂ = −1 + 2 Σ ρ̂_t (+ the last even
 * term), floored at 1/log10(S), ESS = S/τ̂. Returns NaN when the draws have no variance.
 */
export function essBasic(chains: Chains): number {
  const m = chains.length;
  const n = chains[0]?.length ?? 0;
  if (m < 1 || n < 4) return NaN;
  const acov = chains.map((c) => autocovariance(c));
  const means = new Float64Array(m);
  for (let j = 0; j < m; j++) means[j] = mean(chains[j]);
  const meanAcov = (t: number) => {
    let s = 0;
    for (let j = 0; j < m; j++) s += acov[j][t];
    return s / m;
  };
  const meanVar = (meanAcov(0) * n) / (n - 1); // W
  let varPlus = (meanVar * (n - 1)) / n;
  if (m > 1) varPlus += variance(means);
  if (!(varPlus > 0) || !Number.isFinite(varPlus)) return NaN;

  const rho = new Float64Array(n);
  let t = 0;
  let rhoEven = 1;
  rho[0] = rhoEven;
  let rhoOdd = 1 - (meanVar - meanAcov(1)) / varPlus;
  rho[1] = rhoOdd;
  // Initial positive sequence.
  while (t < n - 5 && !Number.isNaN(rhoEven + rhoOdd) && rhoEven + rhoOdd > 0) {
    t += 2;
    rhoEven = 1 - (meanVar - meanAcov(t)) / varPlus;
    rhoOdd = 1 - (meanVar - meanAcov(t + 1)) / varPlus;
    if (rhoEven + rhoOdd >= 0) {
      rho[t] = rhoEven;
      rho[t + 1] = rhoOdd;
    }
  }
  const maxT = t;
  if (rhoEven > 0) rho[maxT] = rhoEven;
  // Initial monotone sequence.
  t = 0;
  while (t <= maxT - 4) {
    t += 2;
    if (rho[t] + rho[t + 1] > rho[t - 2] + rho[t - 1]) {
      rho[t] = (rho[t - 2] + rho[t - 1]) / 2;
      rho[t + 1] = rho[t];
    }
  }
  const s = m * n;
  let sum = 0;
  for (let k = 0; k < Math.max(1, maxT); k++) sum += rho[k];
  let tau = -1 + 2 * sum + rho[maxT];
  tau = Math.max(tau, 1 / Math.log10(s));
  return s / tau;
}

/** Bulk-ESS: ESS of the rank-normalised split chains (Improved R̂, Bayesian Analysis 2021, §4.3). */
export function essBulk(chains: Chains): number {
  return essBasic(rankNormalize(splitChains(chains)));
}

/** ESS of the indicator I(θ ≤ q̂_p) on split chains (Improved R̂, Bayesian Analysis 2021, §4.3). */
export function essQuantile(chains: Chains, p: number, sortedAll?: ArrayLike<number>): number {
  const sorted = sortedAll ?? sortedCopy(pooled(chains));
  const q = quantileSorted(sorted, p);
  return essBasic(splitChains(mapChains(chains, (v) => (v <= q ? 1 : 0))));
}

/** Tail-ESS: the smaller ESS of the 5% and 95% quantile indicators (Improved R̂, Bayesian Analysis 2021, §4.3). */
export function essTail(chains: Chains, sortedAll?: ArrayLike<number>): number {
  const sorted = sortedAll ?? sortedCopy(pooled(chains));
  return Math.min(essQuantile(chains, 0.05, sorted), essQuantile(chains, 0.95, sorted));
}

/** ESS for the mean: untransformed split chains (Improved R̂, Bayesian Analysis 2021, §3.2). */
export function essMean(chains: Chains): number {
  return essBasic(splitChains(chains));
}

/* ------------------------------------------------------------------------------------------ */
/* Monte Carlo standard errors                                                                  */
/* ------------------------------------------------------------------------------------------ */

/** MCSE of the posterior mean: sd(θ) / √ESS_mean. */
export function mcseMean(chains: Chains): number {
  const all = pooled(chains);
  return Math.sqrt(variance(all) / essMean(chains));
}

/** The two tail probabilities of ±1 standard deviation of a normal: Φ(−1), Φ(1). */
const ONE_SD = [0.15865525393145707, 0.8413447460685429];

/**
 * MCSE of the p-quantile (Improved R̂, Bayesian Analysis 2021, §4.4): with S_eff the ESS of I(θ ≤ q̂_p),
 * a = qbeta(Φ(∓1), S_eff·p + 1, S_eff·(1 − p) + 1); the draws at sorted positions
 * max(⌊a₁S⌋, 1) and min(⌈a₂S⌉, S) (1-based) bracket a ±1 sd interval; MCSE = half its width.
 */
export function mcseQuantile(chains: Chains, p: number, sortedAll?: ArrayLike<number>): number {
  const sorted = sortedAll ?? sortedCopy(pooled(chains));
  return mcseQuantileFromEss(sorted, p, essQuantile(chains, p, sorted));
}

/** The same, given the sorted pooled draws and the ESS of the indicator I(θ ≤ q̂_p). */
export function mcseQuantileFromEss(sorted: ArrayLike<number>, p: number, seff: number): number {
  const s = sorted.length;
  if (!Number.isFinite(seff)) return NaN;
  const a1 = qbeta(ONE_SD[0], seff * p + 1, seff * (1 - p) + 1);
  const a2 = qbeta(ONE_SD[1], seff * p + 1, seff * (1 - p) + 1);
  const th1 = sorted[Math.max(Math.floor(a1 * s), 1) - 1];
  const th2 = sorted[Math.min(Math.ceil(a2 * s), s) - 1];
  return (th2 - th1) / 2;
}

/* ------------------------------------------------------------------------------------------ */
/* Energy                                                                                        */
/* ------------------------------------------------------------------------------------------ */

/**
 * Energy Bayesian fraction of missing information of one chain ("Diagnosing suboptimal
 * cotangent disintegrations in Hamiltonian Monte Carlo", arXiv:1604.00695, 2016, eq. for Ê-BFMI): Σ_n (E_n − E_{n−1})² / Σ_n (E_n − Ē)². Small values mean the momentum resampling moves
 * the energy far less than the energy varies, so the sampler explores the energy levels slowly.
 */
export function efmi(energy: ArrayLike<number>): number {
  const n = energy.length;
  if (n < 2) return NaN;
  const m = mean(energy);
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    den += (energy[i] - m) * (energy[i] - m);
    if (i > 0) num += (energy[i] - energy[i - 1]) * (energy[i] - energy[i - 1]);
  }
  return num / den;
}
