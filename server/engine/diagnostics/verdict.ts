/**
 * The plain-language verdict on a run. Every rule is checked and reported (passed or not) so the
 * reader sees why; the level is the worst level among the failed rules.
 *
 * | rule                    | fails when                             | level       | source                                   |
 * |-------------------------|----------------------------------------|-------------|------------------------------------------|
 * | chains-agree            | max R̂ > 1.05                           | do-not-use  | ours (a judgement call)                  |
 * | chains-agree-closely    | max R̂ > 1.01                           | run-longer  | Improved R̂, Bayesian Analysis 2021, §4.4 |
 * | enough-bulk-draws       | min bulk-ESS < 100 × chains            | run-longer  | Improved R̂, Bayesian Analysis 2021, §4.4 |
 * | enough-tail-draws       | min tail-ESS < 100 × chains            | run-longer  | Improved R̂, Bayesian Analysis 2021, §4.4 |
 * | no-divergences          | divergent share of kept draws > 1%     | do-not-use  | ours (a judgement call)                  |
 * | no-divergences          | 0 < divergent share ≤ 1%               | run-longer  | ours (a judgement call)                  |
 * | steps-completed         | rejected share of kept draws > 10%     | run-longer  | ours (a judgement call)                  |
 * | energy-explored         | any chain's E-FMI < 0.2                | run-longer  | ours; see below                          |
 *
 * Sources and judgement calls:
 * - Improved R̂ (Bayesian Analysis 2021) recommends using the draws only when R̂ < 1.01 and, with
 *   four chains, bulk- and tail-ESS above 400 — i.e. 100 per chain, which we apply per chain for
 *   any number of chains. Below that, more draws are the remedy: "run-longer".
 * - R̂ above 1.05 means the chains describe visibly different distributions; we treat that as
 *   "do-not-use" (our threshold, the older 1.1 convention made stricter).
 * - Divergent transitions — the energy error blowing up (non-finite or above 1000, the threshold in
 *   common use) — mark parts of the region the integrator cannot resolve, and running longer does
 *   not fix the bias they signal. Any divergence fails the rule; more than 1% of draws is
 *   "do-not-use", fewer is "run-longer" with an advice to inspect them (our thresholds).
 * - Rejected steps — a transition rejected because an implicit step could not be completed (solver
 *   non-convergence, M not positive definite, leaving the region, run-back mismatch) — are not
 *   divergences: with the run-back check the proposal map restricted to where the forward and
 *   backward solves succeed is an involution ("Unbiased constrained sampling with
 *   self-concordant barrier Hamiltonian Monte Carlo", NeurIPS 2023), so the chain stays exact
 *   and the cost is efficiency, which ESS already measures. We still flag a rejected share above
 *   10% as "run-longer" because it signals slow mixing near the faces; the 10% is our
 *   judgement call, not a published threshold. Runs stored without the count pass as unknown.
 * - E-FMI: "Diagnosing suboptimal cotangent disintegrations in Hamiltonian Monte Carlo" (arXiv
 *   1604.00695, 2016) reports that values below about 0.3 went with poor exploration in its
 *   examples (from memory); we flag below 0.2 as "run-longer" (our threshold).
 *   Samplers without an energy (hit-and-run) pass this rule as not applicable.
 */
import type { Verdict, VerdictLevel } from '../../../shared/fit';
import { DIAGNOSTIC_THRESHOLDS, essFails, essNeeded as essNeededFor, rhatFails } from '../../../shared/diagnostics';

/** The thresholds (defined once in shared/diagnostics.ts, where the client reads them too). */
export const THRESHOLDS = DIAGNOSTIC_THRESHOLDS;

export interface VerdictInput {
  chains: number;
  /** Kept draws per chain. */
  draws: number;
  /** Classic divergences only: energy error non-finite or above 1000. */
  divergences: number;
  /** Transitions rejected because a step could not be completed (absent: not recorded). */
  rejectedSteps?: number;
  maxRhat: number;
  minEssBulk: number;
  minEssTail: number;
  /** Name of the quantity with the worst R̂ / ESS, for the message (optional). */
  worstRhatName?: string;
  worstEssName?: string;
  efmi?: number[];
}

const SEVERITY: Record<VerdictLevel, number> = { trustworthy: 0, 'run-longer': 1, 'do-not-use': 2 };

interface RuleOutcome {
  rule: string;
  passed: boolean;
  detail: string;
  level: VerdictLevel;
  advice: string;
}

const fmt = (v: number, digits = 3) =>
  Number.isFinite(v) ? Number(v.toPrecision(digits)).toString() : String(v);

export function judgeRun(input: VerdictInput): Verdict {
  const t = THRESHOLDS;
  const out: RuleOutcome[] = [];
  const rhatName = input.worstRhatName ? ` (${input.worstRhatName})` : '';
  const essName = input.worstEssName ? ` (${input.worstEssName})` : '';

  out.push({
    rule: `chains agree: max R̂ ≤ ${t.rhatDoNotUse}`,
    passed: input.maxRhat <= t.rhatDoNotUse,
    detail: `max R̂ = ${fmt(input.maxRhat, 4)}${rhatName}`,
    level: 'do-not-use',
    advice: 'the chains disagree about the posterior',
  });
  out.push({
    rule: `chains agree closely: max R̂ ≤ ${t.rhatRunLonger} (Improved R̂, Bayesian Analysis 2021)`,
    passed: !rhatFails(input.maxRhat),
    detail: `max R̂ = ${fmt(input.maxRhat, 4)}${rhatName}`,
    level: 'run-longer',
    advice: 'the chains have not yet mixed well enough',
  });
  const essNeeded = essNeededFor(input.chains);
  out.push({
    rule: `enough draws in the bulk: min bulk-ESS ≥ ${t.essPerChain} × ${input.chains} chains = ${essNeeded} (Improved R̂, Bayesian Analysis 2021)`,
    passed: !essFails(input.minEssBulk, input.chains),
    detail: `min bulk-ESS = ${fmt(input.minEssBulk)}`,
    level: 'run-longer',
    advice: 'too few effective draws for stable means and medians',
  });
  out.push({
    rule: `enough draws in the tails: min tail-ESS ≥ ${t.essPerChain} × ${input.chains} chains = ${essNeeded} (Improved R̂, Bayesian Analysis 2021)`,
    passed: !essFails(input.minEssTail, input.chains),
    detail: `min tail-ESS = ${fmt(input.minEssTail)}${essName}`,
    level: 'run-longer',
    advice: 'too few effective draws for stable 5% and 95% quantiles',
  });
  const kept = input.chains * input.draws;
  const share = kept > 0 ? input.divergences / kept : 0;
  out.push({
    rule: 'no divergent transitions while sampling',
    passed: input.divergences === 0,
    detail: `${input.divergences} of ${kept} draws (${fmt(100 * share, 2)}%)`,
    level: share > t.divergenceShareDoNotUse ? 'do-not-use' : 'run-longer',
    advice:
      share > t.divergenceShareDoNotUse
        ? `more than ${100 * t.divergenceShareDoNotUse}% of transitions diverged, so parts of the region were not explored`
        : 'a few transitions diverged; inspect where they occur',
  });
  if (input.rejectedSteps !== undefined) {
    const rShare = kept > 0 ? input.rejectedSteps / kept : 0;
    out.push({
      rule: `steps completed: rejected steps ≤ ${100 * t.rejectedShareRunLonger}% of draws (our judgement call)`,
      passed: rShare <= t.rejectedShareRunLonger,
      detail: `${input.rejectedSteps} of ${kept} draws (${fmt(100 * rShare, 2)}%)`,
      level: 'run-longer',
      advice:
        'the sampler often could not complete a step near the constraint faces: the draws are exact but mixing is slow; a smaller step or the hit-and-run cross-check may help',
    });
  }
  if (input.efmi && input.efmi.length > 0) {
    const low = Math.min(...input.efmi);
    out.push({
      rule: `energy explored: every chain's E-FMI ≥ ${t.efmiMin}`,
      passed: low >= t.efmiMin,
      detail: `lowest E-FMI = ${fmt(low)}`,
      level: 'run-longer',
      advice: 'the sampler moves slowly between energy levels, so the tails may be under-explored',
    });
  } else {
    out.push({
      rule: `energy explored: every chain's E-FMI ≥ ${t.efmiMin}`,
      passed: true,
      detail: 'not applicable: this sampler has no energy',
      level: 'run-longer',
      advice: '',
    });
  }

  let level: VerdictLevel = 'trustworthy';
  let first: RuleOutcome | undefined;
  for (const r of out) {
    if (r.passed) continue;
    if (SEVERITY[r.level] > SEVERITY[level]) {
      level = r.level;
      first = r;
    }
  }
  let reason: string;
  if (level === 'trustworthy') {
    reason = 'Every check passed: the chains agree and there are enough effective draws.';
  } else {
    const failed = out.filter((r) => !r.passed);
    const others = failed.length - 1;
    const head = level === 'do-not-use' ? 'Do not use these results' : 'Run longer before relying on these results';
    reason =
      `${head}: ${first!.advice} (${first!.detail})` +
      (others > 0 ? `; ${others} more check${others > 1 ? 's' : ''} failed.` : '.');
  }
  return {
    level,
    reason,
    rules: out.map(({ rule, passed, detail }) => ({ rule, passed, detail })),
  };
}
