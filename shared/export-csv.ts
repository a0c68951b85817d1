/** CSV writers for a run's exports: every draw, and the summary table. RFC 4180 quoting. */
import type { QuantitySummary } from './fit';

export function csvField(v: string | number): string {
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : Number.isNaN(v) ? 'NaN' : v > 0 ? 'Inf' : '-Inf';
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** Header of the draws file: chain, iteration (1-based, after warm-up), then one column per quantity. */
export function drawsCsvHeader(names: readonly string[]): string {
  return ['chain', 'iteration', ...names].map(csvField).join(',');
}

/**
 * Rows of one chain: `unknowns` is draws × dimU row-major, `derived` draws × dimD row-major.
 * Numbers are written in the shortest form that reads back to the same double. `firstIteration`
 * numbers the first row (a piece of a chain written in bounded chunks starts past 1).
 */
export function* drawsCsvRows(chain: number, unknowns: Float64Array, dimU: number, derived: Float64Array, dimD: number, firstIteration = 1): Generator<string> {
  const n = dimU > 0 ? unknowns.length / dimU : dimD > 0 ? derived.length / dimD : 0;
  for (let t = 0; t < n; t++) {
    const parts: string[] = [String(chain), String(t + firstIteration)];
    for (let k = 0; k < dimU; k++) parts.push(csvField(unknowns[t * dimU + k]));
    for (let k = 0; k < dimD; k++) parts.push(csvField(derived[t * dimD + k]));
    yield parts.join(',');
  }
}

/**
 * The summary file: one row per quantity, columns in the order a reader of a constrained model asks
 * about them — where the quantity lies (median and the central 90 % interval), its posterior mean
 * and spread, whether the chains mixed, and how precise the Monte Carlo estimates are. Column
 * meanings are documented in docs/engine.md ("Summary file").
 */
const SUMMARY_COLUMNS: readonly { header: string; value: (q: QuantitySummary) => string | number }[] = [
  { header: 'quantity', value: (q) => q.name },
  { header: 'origin', value: (q) => q.kind },
  { header: 'median', value: (q) => q.q50 },
  { header: 'interval90_low', value: (q) => q.q5 },
  { header: 'interval90_high', value: (q) => q.q95 },
  { header: 'posterior_mean', value: (q) => q.mean },
  { header: 'posterior_sd', value: (q) => q.sd },
  { header: 'mixing_rhat', value: (q) => q.rhat },
  { header: 'effective_draws_centre', value: (q) => q.essBulk },
  { header: 'effective_draws_tails', value: (q) => q.essTail },
  { header: 'mc_error_median', value: (q) => q.mcseQ50 },
  { header: 'mc_error_interval90_low', value: (q) => q.mcseQ5 },
  { header: 'mc_error_interval90_high', value: (q) => q.mcseQ95 },
  { header: 'mc_error_mean', value: (q) => q.mcseMean },
];

export const SUMMARY_CSV_COLUMNS: readonly string[] = SUMMARY_COLUMNS.map((c) => c.header);

export function summaryCsv(quantities: readonly QuantitySummary[]): string {
  const lines = [SUMMARY_CSV_COLUMNS.map(csvField).join(',')];
  for (const q of quantities) lines.push(SUMMARY_COLUMNS.map((c) => csvField(c.value(q))).join(','));
  return lines.join('\n') + '\n';
}
