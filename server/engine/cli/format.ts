/**
 * Output of the headless fit: a readable table, the stable JSON document (docs/engine.md) and the
 * draws as CSV.
 */
import type { FitSummary } from '../../../shared/fit';
import { drawsCsvHeader, drawsCsvRows } from '../../../shared/export-csv';
import type { FitResult } from '../types';
import { essFails, rhatFails } from '../../../shared/diagnostics';

/** Version of the JSON document; raised only when a field changes meaning or disappears. */
export const JSON_FORMAT_VERSION = 1;

/** The JSON document printed by --json: the fit summary plus a format version. */
export function summaryJson(summary: FitSummary, model?: string, extra: Record<string, unknown> = {}): string {
  const doc = {
    format: 'slackline-fit',
    version: JSON_FORMAT_VERSION,
    ...(model !== undefined ? { model } : {}),
    quantities: summary.quantities.map((q) => ({
      name: q.name,
      kind: q.kind,
      mean: q.mean,
      sd: q.sd,
      q5: q.q5,
      q50: q.q50,
      q95: q.q95,
      rhat: q.rhat,
      essBulk: q.essBulk,
      essTail: q.essTail,
      mcseMean: q.mcseMean,
      mcseQ5: q.mcseQ5,
      mcseQ50: q.mcseQ50,
      mcseQ95: q.mcseQ95,
    })),
    diagnostics: summary.diagnostics,
    verdict: summary.verdict,
    settings: summary.settings,
    seconds: summary.seconds,
    ...(summary.mode ? { mode: summary.mode } : {}),
    ...extra,
  };
  return JSON.stringify(doc, null, 2);
}

/** A number in `digits` significant figures, without exponent for ordinary magnitudes. */
export function fmtNum(v: number, digits = 4): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e6 || a < 1e-4) return v.toExponential(digits - 1);
  return Number(v.toPrecision(digits)).toString();
}

function fmtInt(v: number): string {
  return Number.isFinite(v) ? Math.round(v).toString() : String(v);
}

function table(header: string[], rows: string[][], leftCols = 1): string {
  const widths = header.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]) =>
    cells.map((c, j) => (j < leftCols ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ').trimEnd();
  return [line(header), line(widths.map((w) => '─'.repeat(w))), ...rows.map(line)].join('\n');
}

const LEVEL_WORDS: Record<FitSummary['verdict']['level'], string> = {
  trustworthy: 'TRUSTWORTHY',
  'run-longer': 'RUN LONGER',
  'do-not-use': 'DO NOT USE',
};

/** The readable summary printed without --json. */
export function summaryTable(summary: FitSummary, model?: string): string {
  const s = summary.settings;
  const d = summary.diagnostics;
  const out: string[] = [];
  out.push(
    `Fit${model ? ` of ${model}` : ''}: ${s.chains} chain${s.chains > 1 ? 's' : ''} × ${s.draws} draws after ${s.warmup} warm-up, ` +
      `seed ${s.seed}, ${fmtNum(summary.seconds, 3)} s`,
  );
  out.push(`Sampler: ${d.samplerUsed} — ${d.samplerReason}`);
  if (summary.verdict.level !== 'trustworthy') {
    out.push(`Warning — ${summary.verdict.reason}`);
  }
  out.push('');
  // "!" marks a quantity whose own R̂ or ESS fails the verdict's thresholds.
  const flag = (q: FitSummary['quantities'][number]) =>
    rhatFails(q.rhat) || essFails(q.essBulk, s.chains) || essFails(q.essTail, s.chains) ? '!' : '';
  // Estimate first (median and central 90 % interval, then mean and sd), then how well the chains
  // mixed and how precise the median is; a bar separates the two groups.
  const rows = summary.quantities.map((q) => [
    q.kind === 'derived' ? `${q.name} (derived)` : q.name,
    fmtNum(q.q50),
    `${fmtNum(q.q5)} to ${fmtNum(q.q95)}`,
    fmtNum(q.mean),
    fmtNum(q.sd, 3),
    '│',
    q.rhat.toFixed(3),
    fmtInt(q.essBulk),
    fmtInt(q.essTail),
    fmtNum(q.mcseQ50, 2),
    flag(q),
  ]);
  out.push(
    table(
      ['quantity', 'median', '90% interval', 'mean', 'sd', '│', 'mixing R̂', 'eff. draws centre', 'eff. draws tails', 'MC error of median', ''],
      rows,
    ),
  );
  if (summary.mode) {
    out.push('');
    out.push('Maximum a posteriori:');
    out.push(table(['quantity', 'mode'], Object.entries(summary.mode).map(([k, v]) => [k, fmtNum(v, 6)])));
  }
  out.push('');
  const parts = [
    `divergences ${d.divergences}`,
    ...(d.rejectedSteps !== undefined ? [`rejected steps ${d.rejectedSteps}`] : []),
    `acceptance ${fmtNum(d.acceptance, 3)}`,
    `step size ${d.stepSize > 0 ? fmtNum(d.stepSize, 3) : 'n/a'}`,
    `max R̂ ${d.maxRhat.toFixed(3)}`,
    `fewest effective draws: centre ${fmtInt(d.minEssBulk)}, tails ${fmtInt(d.minEssTail)}`,
  ];
  if (d.efmi) parts.push(`E-FMI ${d.efmi.map((v) => fmtNum(v, 2)).join(' ')}`);
  if (d.factorizationsPerStep !== undefined) parts.push(`factorisations/step ${fmtNum(d.factorizationsPerStep, 3)}`);
  out.push(`Diagnostics: ${parts.join(' · ')}`);
  out.push(`Verdict: ${LEVEL_WORDS[summary.verdict.level]} — ${summary.verdict.reason}`);
  for (const r of summary.verdict.rules) out.push(`  ${r.passed ? 'pass' : 'FAIL'}  ${r.rule}: ${r.detail}`);
  return out.join('\n');
}

/**
 * Every draw as CSV, in the same format as the notebook's draws export (shared/export-csv):
 * chain, iteration (both 1-based; iteration counts kept draws), then the unknowns' flat
 * coordinates, then the derived quantities.
 */
export function drawsCsv(result: FitResult): string {
  const lines = [drawsCsvHeader([...result.unknownNames, ...result.derivedNames])];
  const du = result.unknownNames.length;
  const dd = result.derivedNames.length;
  for (const ch of result.chains) lines.push(...drawsCsvRows(ch.chain + 1, ch.draws, du, ch.derivedDraws, dd));
  return lines.join('\n') + '\n';
}
