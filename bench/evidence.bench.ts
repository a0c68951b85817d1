/**
 * Evidence benchmark: seconds until log Z has a standard error ≤ 0.05 (replicates are added until it
 * does, at least 4), on the d = 20 unit cube, the d = 20 standard simplex, the cross-polytope, and the
 * Bayes factor of a full ordering of 10 means with 1,000 rows of normal data (each of its four log Z
 * to SE ≤ 0.025, so the log BF's SE is ≤ 0.05). Goal: ≤ 60 s each.
 *
 * The cross-polytope {Σ|xⱼ| ≤ 1} has 2^d facets; at d = 20 that is 1,048,576 rows, each chord move
 * reading all of them. Through its rows it is measured at d = 10 (1,024 rows); a one-off run through
 * its rows at d = 20 (docs/engine.md §8.6) spent 39 s preparing the rows and 58 s before its first
 * stage, and did not finish 5 stages in 20 minutes. At d = 20 (and at d = 10 for comparison) it is
 * measured as an oracle body (anneal.ts l1BallOracle: a chord in O(d)), the same Gaussian cooling.
 * The last case times the demo notebook's comparison (compare.ts: the ordering of the dose–response
 * model tested, a one-mean model beside it, 4 replicates; no fits, so no leave-one-out).
 * Runnable alone: `npx tsx bench/evidence.bench.ts`.
 */
import { fileURLToPath } from 'node:url';
import { prepareTarget } from '../server/engine/geometry';
import { computeOracleVolume, computeVolume, l1BallOracle } from '../server/engine/evidence';
import { computeComparison } from '../server/engine/evidence/compare';
import { DEMO_FLAT_MODEL, DEMO_MONOTONE_MODEL, DEMO_ORDER_LINE, DEMO_STORMS_CSV } from '../server/seed/notebook';
import { parseCsv } from '../shared/data';
import { testHypothesis } from '../server/engine/evidence/program';
import { Rng } from '../server/engine/rng';
import type { DataTables } from '../server/engine/types';
import { box, crossPolytope, simplex } from '../tests/unit/evidence/targets';

function logFactorial(d: number): number {
  let s = 0;
  for (let i = 2; i <= d; i++) s += Math.log(i);
  return s;
}

function volumeCase(name: string, target: Parameters<typeof prepareTarget>[0], truth: number, out: Record<string, number | string>) {
  const t0 = performance.now();
  const p = prepareTarget(target);
  const r = computeVolume(p, { replicates: 4, targetSe: 0.05, seed: 7 });
  out[`${name}_seconds`] = (performance.now() - t0) / 1000;
  out[`${name}_logV`] = r.volumeLog!;
  out[`${name}_se`] = r.volumeSe!;
  out[`${name}_error`] = r.volumeLog! - truth;
  out[`${name}_replicates`] = r.replicates;
  out[`${name}_stages`] = r.stages;
}

export async function run(): Promise<Record<string, number | string>> {
  const out: Record<string, number | string> = {};
  volumeCase('cube20', box(new Array(20).fill(1)), 0, out);
  volumeCase('simplex20', simplex(20), -logFactorial(20), out);
  volumeCase('cross10', crossPolytope(10), 10 * Math.log(2) - logFactorial(10), out);
  for (const d of [10, 20]) {
    const t0 = performance.now();
    const r = computeOracleVolume(d, l1BallOracle(d, 1), { replicates: 4, targetSe: 0.05, seed: 7 });
    out[`cross${d}_oracle_seconds`] = (performance.now() - t0) / 1000;
    out[`cross${d}_oracle_logV`] = r.volumeLog!;
    out[`cross${d}_oracle_se`] = r.volumeSe!;
    out[`cross${d}_oracle_error`] = r.volumeLog! - (d * Math.log(2) - logFactorial(d));
    out[`cross${d}_oracle_replicates`] = r.replicates;
    out[`cross${d}_oracle_stages`] = r.stages;
  }

  // 10 group means, 100 rows each, known σ; exchangeable normal prior; hypothesis: full ordering.
  const k = 10;
  const rows = 1000;
  const rng = new Rng(31, 4);
  const y = new Float64Array(rows);
  const g = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    const j = i % k;
    g[i] = j + 1;
    y[i] = 0.05 * j + rng.normal();
  }
  const tables: DataTables = {
    d: {
      rows,
      columns: {
        y: { type: 'numeric', values: y },
        g: { type: 'category', values: g, levels: Array.from({ length: k }, (_, j) => `dose${j + 1}`) },
      },
    },
  };
  const src = `table d\nunknown mu[${k}]\nterm ld_normal(y, mu[g], 1)\nterm ld_normal(mu, 0, 1)\nconstrain diff(mu) >= 0\n`;
  const t0 = performance.now();
  const h = testHypothesis(src, tables, [5], { replicates: 4, targetSe: 0.025, seed: 9 });
  out.order10_seconds = (performance.now() - t0) / 1000;
  out.order10_logBF = h.logBF;
  out.order10_se = h.se;
  out.order10_logPriorMass = h.prior.log;
  out.order10_priorMassError = h.prior.log + logFactorial(k);
  out.order10_logPosteriorMass = h.posterior.log;
  out.order10_stages = h.stages;

  const storms = { storms: parseCsv(DEMO_STORMS_CSV).table! } as unknown as DataTables;
  const t1 = performance.now();
  const c = computeComparison({
    models: [
      { cellId: 'mono', label: 'rising', source: DEMO_MONOTONE_MODEL, tables: storms, tableIds: { storms: 's' }, fit: null },
      { cellId: 'flat', label: 'one mean', source: DEMO_FLAT_MODEL, tables: storms, tableIds: { storms: 's' }, fit: null },
    ],
    hypotheses: [{ modelCellId: 'mono', lines: [DEMO_ORDER_LINE] }],
    reference: { modelCellId: 'mono', without: [DEMO_ORDER_LINE] },
    priorOdds: [],
    replicates: 4,
    seed: 20261201,
    factors: [1],
  });
  out.demo_compare_seconds = (performance.now() - t1) / 1000;
  out.demo_compare_logBF = c.hypotheses[0].logBF;
  out.demo_compare_se = c.hypotheses[0].se;
  return out;
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  run().then((r) => console.log(r));
}
