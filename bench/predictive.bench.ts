/**
 * Model checks: PSIS leave-one-out on a 4 000 draws × 1 000 rows log-likelihood matrix, the
 * compiled pointwise log-likelihood per draw, and one replicated data set of 1 000 rows per draw
 * (normal regression with a gather). Figures are medians of repeated timed calls.
 */
import { compileProgram } from '../server/engine/compile/index';
import { compilePointwise, compileReplicates } from '../server/engine/compile/predictive';
import { psisLoo } from '../server/engine/predictive/psis';
import { Rng } from '../server/engine/rng';
import type { DataTables } from '../server/engine/types';

const ROWS = 1000;
const DRAWS = 4000;

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

export async function run(): Promise<Record<string, number | string>> {
  const rng = new Rng(20261203);
  const y = new Float64Array(ROWS);
  const g = new Float64Array(ROWS);
  for (let i = 0; i < ROWS; i++) {
    g[i] = 1 + (i % 4);
    y[i] = g[i] + rng.normal();
  }
  const tables: DataTables = {
    plots: { rows: ROWS, columns: { y: { type: 'numeric', values: y }, g: { type: 'category', values: g, levels: ['a', 'b', 'c', 'd'] } } },
  };
  const src = `table plots
unknown mu[4], sigma
term ld_normal(y, mu[g], sigma)
term ld_normal(mu, 0, 5) + ld_halfnormal(sigma, 2)
constrain sigma >= 0.01
replicate y_new = ld_normal(y, mu[g], sigma)`;
  const model = compileProgram(src, tables);
  const pw = compilePointwise(model.check, tables);
  if (!pw.ok) throw new Error(pw.reason);
  const rep = compileReplicates(model.check, tables)!;
  const thetas: Float64Array[] = [];
  for (let s = 0; s < DRAWS; s++) {
    const t = new Float64Array(5);
    for (let k = 0; k < 4; k++) t[k] = k + 1 + 0.03 * rng.normal();
    t[4] = 1 + 0.02 * rng.normal();
    thetas.push(t);
  }
  const ll = new Float64Array(DRAWS * ROWS);
  const row = new Float64Array(ROWS);
  const t0 = performance.now();
  for (let s = 0; s < DRAWS; s++) ll.set(pw.pointwise.evaluate(thetas[s], row), s * ROWS);
  const pointwiseUs = ((performance.now() - t0) * 1000) / DRAWS;
  const looMs: number[] = [];
  for (let r = 0; r < 3; r++) {
    const t1 = performance.now();
    psisLoo(ll, DRAWS, ROWS);
    looMs.push(performance.now() - t1);
  }
  const simUs: number[] = [];
  const r2 = new Rng(5);
  for (let r = 0; r < 5; r++) {
    const t2 = performance.now();
    for (let s = 0; s < 200; s++) rep.simulate(thetas[s], r2);
    simUs.push(((performance.now() - t2) * 1000) / 200);
  }
  return {
    rows: ROWS,
    draws: DRAWS,
    'pointwise log-lik per draw (µs)': pointwiseUs,
    'PSIS-LOO, all rows (ms)': median(looMs),
    'one replicate of 1000 rows (µs)': median(simUs),
  };
}
