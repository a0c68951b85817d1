/**
 * The diagnostic thresholds, defined once: the engine's verdict, the fit command's table and the
 * notebook's summary all judge R̂ and ESS with these constants and these two functions.
 *
 * R̂ ≤ 1.01 and bulk- and tail-ESS ≥ 100 per chain (400 for four chains) follow "Rank-normalization,
 * folding, and localization: an improved R̂ for assessing convergence of MCMC", Bayesian Analysis
 * 16(2), 2021, §4.4. The others are our judgement calls, explained in server/engine/diagnostics/verdict.ts.
 */
export const DIAGNOSTIC_THRESHOLDS = {
  rhatDoNotUse: 1.05,
  rhatRunLonger: 1.01,
  essPerChain: 100,
  divergenceShareDoNotUse: 0.01,
  /** Our judgement call: above this share of rejected steps, "run-longer". */
  rejectedShareRunLonger: 0.1,
  efmiMin: 0.2,
} as const;

/** Bulk- and tail-ESS needed for a run of `chains` chains. */
export function essNeeded(chains: number): number {
  return DIAGNOSTIC_THRESHOLDS.essPerChain * Math.max(1, chains);
}

/** R̂ above 1.01 (or not a number) fails; exactly 1.01 passes, as in the verdict. */
export function rhatFails(rhat: number): boolean {
  return !(rhat <= DIAGNOSTIC_THRESHOLDS.rhatRunLonger);
}

/** ESS below 100 per chain (or not a number) fails. */
export function essFails(ess: number, chains: number): boolean {
  return !(ess >= essNeeded(chains));
}
