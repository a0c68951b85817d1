import { describe, expect, it } from 'vitest';
import { judgeRun, THRESHOLDS, type VerdictInput } from '../../../server/engine/diagnostics/verdict';
import { summarizeQuantity } from '../../../server/engine/diagnostics/summary';
import { quantitySummarySchema, verdictSchema } from '../../../shared/fit';
import { Rng } from '../../../server/engine/rng';
import { essBulk, essTail, mcseMean, mcseQuantile, rhat } from '../../../server/engine/diagnostics/convergence';

const good: VerdictInput = {
  chains: 4,
  draws: 1000,
  divergences: 0,
  rejectedSteps: 0,
  maxRhat: 1.003,
  minEssBulk: 1500,
  minEssTail: 1200,
  efmi: [0.9, 1.1, 0.8, 1.0],
};

// The rule table documented in verdict.ts: R̂ 1.01 and ESS 100 per chain from Improved R̂ (Bayesian Analysis 2021);
// 1.05, the 1% divergence share, the 10% rejected-step share and E-FMI 0.2 are our judgement calls.
const cases: Array<{ name: string; change: Partial<VerdictInput>; level: string; failed: number; rules?: number }> = [
  { name: 'all good', change: {}, level: 'trustworthy', failed: 0 },
  { name: 'R̂ exactly 1.01 passes', change: { maxRhat: 1.01 }, level: 'trustworthy', failed: 0 },
  { name: 'R̂ 1.02', change: { maxRhat: 1.02 }, level: 'run-longer', failed: 1 },
  { name: 'R̂ 1.06', change: { maxRhat: 1.06 }, level: 'do-not-use', failed: 2 },
  { name: 'bulk-ESS 399 with 4 chains', change: { minEssBulk: 399 }, level: 'run-longer', failed: 1 },
  { name: 'bulk-ESS 400 with 4 chains', change: { minEssBulk: 400 }, level: 'trustworthy', failed: 0 },
  { name: 'tail-ESS 200 with 2 chains passes', change: { chains: 2, minEssTail: 200 }, level: 'trustworthy', failed: 0 },
  { name: 'tail-ESS 199 with 2 chains', change: { chains: 2, minEssTail: 199 }, level: 'run-longer', failed: 1 },
  { name: 'one divergence in 4000', change: { divergences: 1 }, level: 'run-longer', failed: 1 },
  { name: '40 divergences in 4000 (1%)', change: { divergences: 40 }, level: 'run-longer', failed: 1 },
  { name: '41 divergences in 4000', change: { divergences: 41 }, level: 'do-not-use', failed: 1 },
  { name: 'E-FMI 0.15 in one chain', change: { efmi: [0.9, 0.15, 1, 1] }, level: 'run-longer', failed: 1 },
  { name: 'no energy (hit-and-run)', change: { efmi: undefined }, level: 'trustworthy', failed: 0 },
  // Rejected steps (a step could not be completed) keep the chain exact: only a large share fails,
  // and only as run-longer; they never count as divergences.
  { name: '4 rejected steps in 4000 pass', change: { rejectedSteps: 4 }, level: 'trustworthy', failed: 0 },
  { name: '400 rejected steps in 4000 (10%) pass', change: { rejectedSteps: 400 }, level: 'trustworthy', failed: 0 },
  { name: '401 rejected steps in 4000', change: { rejectedSteps: 401 }, level: 'run-longer', failed: 1 },
  { name: 'half the steps rejected is still run-longer', change: { rejectedSteps: 2000 }, level: 'run-longer', failed: 1 },
  {
    name: 'rejections and one divergence fail separately',
    change: { rejectedSteps: 500, divergences: 1 },
    level: 'run-longer',
    failed: 2,
  },
  { name: 'summary stored without the count: rule not shown', change: { rejectedSteps: undefined }, level: 'trustworthy', failed: 0, rules: 6 },
  {
    name: 'several failures take the worst level',
    change: { maxRhat: 1.2, minEssBulk: 50, divergences: 3 },
    level: 'do-not-use',
    failed: 4,
  },
];

describe('verdict rules (table in verdict.ts)', () => {
  for (const c of cases) {
    it(c.name, () => {
      const v = judgeRun({ ...good, ...c.change });
      expect(verdictSchema.parse(v)).toEqual(v);
      expect(v.level).toBe(c.level);
      expect(v.rules.filter((r) => !r.passed)).toHaveLength(c.failed);
      // Every rule is shown, passed or not.
      expect(v.rules).toHaveLength(c.rules ?? 7);
      if (c.level !== 'trustworthy') expect(v.reason).toMatch(/Run longer|Do not use/);
    });
  }
  it('thresholds are the documented ones', () => {
    expect(THRESHOLDS).toEqual({
      rhatDoNotUse: 1.05,
      rhatRunLonger: 1.01,
      essPerChain: 100,
      divergenceShareDoNotUse: 0.01,
      rejectedShareRunLonger: 0.1,
      efmiMin: 0.2,
    });
  });
  it('gives the rejected-steps advice when that is the failing rule', () => {
    const v = judgeRun({ ...good, rejectedSteps: 1000 });
    expect(v.reason).toContain('could not complete a step near the constraint faces');
    expect(v.reason).toContain('1000 of 4000 draws (25%)');
  });
  it('names the quantity with the worst R̂ in the detail', () => {
    const v = judgeRun({ ...good, maxRhat: 1.3, worstRhatName: 'mu[2]' });
    expect(v.reason).toContain('mu[2]');
  });
});

describe('summarizeQuantity', () => {
  it('gives schema-valid numbers and the textbook moments for iid N(3, 2²) draws', () => {
    // Mean and sd of the draws vs the generating N(3, 2²): |error| < 4·MCSE (MCSE from the run).
    const rng = new Rng(5);
    const chains = Array.from({ length: 4 }, () => Float64Array.from({ length: 1000 }, () => 3 + 2 * rng.normal()));
    const s = quantitySummarySchema.parse(summarizeQuantity('mu[1]', 'unknown', chains));
    expect(Math.abs(s.mean - 3)).toBeLessThan(4 * s.mcseMean);
    // 5% and 95% quantiles of N(3, 2²): 3 ∓ 1.6448536·2 (normal table value, from memory).
    expect(Math.abs(s.q5 - (3 - 2 * 1.6448536))).toBeLessThan(4 * s.mcseQ5);
    expect(Math.abs(s.q95 - (3 + 2 * 1.6448536))).toBeLessThan(4 * s.mcseQ95);
    expect(Math.abs(s.q50 - 3)).toBeLessThan(4 * s.mcseQ50);
    expect(s.rhat).toBeLessThan(1.01);
  });
  it('shares work between diagnostics but gives the same numbers as the separate functions', () => {
    const rng = new Rng(6);
    const chains = Array.from({ length: 3 }, () => {
      const x = new Float64Array(401);
      let v = 0;
      for (let i = 0; i < x.length; i++) x[i] = v = 0.7 * v + rng.normal();
      return x;
    });
    const s = summarizeQuantity('a', 'unknown', chains);
    expect(s.rhat).toBe(rhat(chains));
    expect(s.essBulk).toBe(essBulk(chains));
    expect(s.essTail).toBe(essTail(chains));
    expect(s.mcseMean).toBeCloseTo(mcseMean(chains), 12);
    for (const [p, v] of [[0.05, s.mcseQ5], [0.5, s.mcseQ50], [0.95, s.mcseQ95]] as const) {
      expect(v).toBe(mcseQuantile(chains, p));
    }
  });
  it('reports a constant quantity as exactly known', () => {
    const chains = [new Float64Array(100).fill(1.5), new Float64Array(100).fill(1.5)];
    const s = quantitySummarySchema.parse(summarizeQuantity('fixed', 'derived', chains));
    expect(s).toMatchObject({ mean: 1.5, sd: 0, rhat: 1, essBulk: 200, mcseMean: 0 });
  });
  it('reports chains stuck at different values with a huge finite R̂ and zero ESS', () => {
    const chains = [new Float64Array(100).fill(1), new Float64Array(100).fill(2)];
    const s = quantitySummarySchema.parse(summarizeQuantity('stuck', 'unknown', chains));
    expect(s.rhat).toBeGreaterThan(1000);
  });
  it('throws a clear error on a non-finite draw', () => {
    const chains = [Float64Array.from([1, 2, NaN, 4]), Float64Array.from([1, 2, 3, 4])];
    expect(() => summarizeQuantity('gain', 'derived', chains)).toThrow(/gain is NaN at chain 1, draw 3/);
  });
});
