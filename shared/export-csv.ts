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
 * Numbers are written in the shortest form that reads back to the same double.
 */
export function* drawsCsvRows(chain: number, unknowns: Float64Array, dimU: number, derived: Float64Array, dimD: number): Generator<string> {
  const n = dimU > 0 ? unknowns.length / dimU : dimD > 0 ? derived.length / dimD : 0;
  for (let t = 0; t < n; t++) {
    const parts: string[] = [String(chain), String(t + 1)];
    for (let k = 0; k < dimU; k++) parts.push(csvField(unknowns[t * dimU + k]));
    for (let k = 0; k < dimD; k++) parts.push(csvField(derived[t * dimD + k]));
    yield parts.join(',');
  }
}

export const SUMMARY_CSV_COLUMNS = ['quantity', 'kind', 'mean', 'sd', 'q5', 'q50', 'q95', 'rhat', 'ess_bulk', 'ess_tail', 'mcse_mean', 'mcse_q5', 'mcse_q50', 'mcse_q95'] as const;

export function summaryCsv(quantities: readonly QuantitySummary[]): string {
  const lines = [SUMMARY_CSV_COLUMNS.join(',')];
  for (const q of quantities) {
    lines.push(
      [q.name, q.kind, q.mean, q.sd, q.q5, q.q50, q.q95, q.rhat, q.essBulk, q.essTail, q.mcseMean, q.mcseQ5, q.mcseQ50, q.mcseQ95].map(csvField).join(','),
    );
  }
  return lines.join('\n') + '\n';
}
