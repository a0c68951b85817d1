/**
 * End-to-end fit orchestration: the same fit in-process and on worker threads (wall time, worker
 * overhead, identical draws), and the cost of the diagnostics per quantity.
 */
import { fileURLToPath } from 'node:url';
import { closeFitWorkers, runFit } from '../server/engine/fit';
import { summarizeQuantity } from '../server/engine/diagnostics';
import { Rng } from '../server/engine/rng';
import type { TargetSpec } from '../server/engine/types';

const FIXTURES = fileURLToPath(new URL('../tests/unit/fit/fixtures.ts', import.meta.url));

export async function run(): Promise<Record<string, number | string>> {
  const spec: TargetSpec = { kind: 'module', modulePath: FIXTURES, exportName: 'truncatedNormal', args: { lo: -1, hi: 2 } };
  const settings = { chains: 4, warmup: 1000, draws: 1000, seed: 11, sampler: 'rhmc' as const };

  let t0 = performance.now();
  const seq = await runFit(spec, settings, { parallel: false });
  const inProcess = (performance.now() - t0) / 1000;
  t0 = performance.now();
  await runFit(spec, settings, { parallel: true });
  const workersCold = (performance.now() - t0) / 1000;
  // Second run on the worker threads kept from the first.
  t0 = performance.now();
  const par = await runFit(spec, settings, { parallel: true });
  const workers = (performance.now() - t0) / 1000;
  await closeFitWorkers();
  const identical = seq.chains.every((c, i) => c.draws.every((v, j) => v === par.chains[i].draws[j]));

  // Diagnostics: summarise 4 chains × 1000 AR(1) draws for 50 quantities.
  const rng = new Rng(3);
  const q = 50;
  const chainsPerQ = Array.from({ length: q }, () =>
    Array.from({ length: 4 }, () => {
      const x = new Float64Array(1000);
      let v = 0;
      for (let i = 0; i < 1000; i++) x[i] = v = 0.5 * v + rng.normal();
      return x;
    }),
  );
  t0 = performance.now();
  for (let k = 0; k < q; k++) summarizeQuantity(`x[${k + 1}]`, 'unknown', chainsPerQ[k]);
  const diagMs = (performance.now() - t0) / q;

  return {
    'truncnormal_4x2000_inprocess_s': inProcess,
    'truncnormal_4x2000_workers_cold_s': workersCold,
    'truncnormal_4x2000_workers_warm_s': workers,
    'warm_workers_speedup': inProcess / workers,
    'identical_draws': identical ? 'yes' : 'NO',
    'truncnormal_min_ess_bulk_per_draw': par.summary.diagnostics.minEssBulk / 4000,
    'summary_ms_per_quantity_4x1000': diagMs,
  };
}
