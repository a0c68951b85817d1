/**
 * When a summary value counts as failing, for highlighting in the summary table.
 * Thresholds from "Rank-normalization, folding, and localization: an improved R̂ for assessing
 * convergence of MCMC", Bayesian Analysis 16(2), 2021: use a draw only when
 * R̂ < 1.01 and bulk- and tail-ESS are at least 100 per chain (e.g. 400 for four chains).
 */
export const RHAT_LIMIT = 1.01;
export const ESS_PER_CHAIN = 100;

export function rhatFails(rhat: number): boolean {
  return !(rhat < RHAT_LIMIT);
}

export function essFails(ess: number, chains: number): boolean {
  return !(ess >= ESS_PER_CHAIN * Math.max(1, chains));
}
