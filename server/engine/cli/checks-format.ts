/**
 * Output of the model checks in the fit command: JSON fields, readable lines and the replicates
 * file (see docs/engine.md, section 5).
 */
import { csvField, drawsCsvHeader } from '../../../shared/export-csv';
import type { FitResult } from '../types';
import type { ModelChecks } from '../predictive/checks';
import { fmtNum } from './format';

/** Fields added to the JSON document: `checks`, and `loo` or `looUnavailable`. */
export function checksJson(c: ModelChecks): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  if (c.predictive.length) {
    out.checks = {
      kind: c.kind,
      replicates: c.predictive[0].replicates,
      statistics: c.predictive,
    };
  }
  if (c.loo) out.loo = c.loo;
  if (c.looUnavailable) out.looUnavailable = c.looUnavailable;
  return out;
}

const pText = (p: number) => (p < 0.01 ? '<0.01' : p > 0.99 ? '>0.99' : p.toFixed(2));

/** Readable lines appended to the summary table. */
export function checksTable(c: ModelChecks): string {
  const out: string[] = [];
  for (const pc of c.predictive) {
    out.push('');
    out.push(`${c.kind === 'prior' ? 'Prior' : 'Posterior'} predictive checks of ${pc.name} (${pc.replicates} replicated data sets; p = Pr(replicated > observed)):`);
    const line = (label: string, checks: typeof pc.checks) =>
      `  ${label.padEnd(22)} ` + checks.map((x) => `${x.stat} ${fmtNum(x.observed, 3)} (p ${pText(x.p)})`).join(' · ');
    out.push(line('all rows', pc.checks));
    for (const g of pc.groups) out.push(line(`${g.column} = ${g.level} (${g.rows})`, g.checks));
  }
  if (c.loo) {
    const l = c.loo;
    out.push('');
    out.push(
      `Leave-one-out (PSIS): elpd ${fmtNum(l.elpd, 5)} (se ${fmtNum(l.se, 3)}, mcse ${fmtNum(l.mcse, 2)}) · ` +
        `effective parameters ${fmtNum(l.pLoo, 3)} · ${l.rows.length} rows, ${l.draws} draws`,
    );
    if (l.highK.length) {
      const named = l.highK.slice(0, 10).map((h) => `${h.table} row ${h.row} (k̂ ${fmtNum(h.k, 2)})`);
      out.push(`  Rows with k̂ > ${l.kThreshold}: ${named.join(', ')}${l.highK.length > 10 ? `, and ${l.highK.length - 10} more` : ''}.`);
      out.push('  Their leave-one-out estimates are unreliable: these rows are highly influential or poorly fitted.');
    } else {
      out.push(`  Every row has k̂ ≤ ${l.kThreshold}.`);
    }
  } else if (c.looUnavailable) {
    out.push('');
    out.push(`Leave-one-out: not computed — ${c.looUnavailable}.`);
  }
  return out.length ? '\n' + out.join('\n') : '';
}

/**
 * The replicated data as CSV: one line per replicate with its number (1-based), the chain and
 * iteration of the draw it was simulated from, then every replicate statement's values named
 * `name[1]`, `name[2]`, … (a single value is named `name`).
 */
export function replicatesCsv(c: ModelChecks, result: FitResult): string {
  const dim = result.unknownNames.length;
  const sizes = result.chains.map((ch) => ({ chain: ch.chain, n: dim > 0 ? ch.draws.length / dim : 0 }));
  const where = (s: number) => {
    for (const z of sizes) {
      if (s < z.n) return { chain: z.chain + 1, iteration: s + 1 };
      s -= z.n;
    }
    return { chain: 0, iteration: 0 };
  };
  const names: string[] = [];
  for (const r of c.replicated) {
    if (r.spec.length === 1 && r.values[0]?.length === 1) names.push(r.spec.name);
    else for (let i = 1; i <= r.spec.length; i++) names.push(`${r.spec.name}[${i}]`);
  }
  const head = drawsCsvHeader(names).replace(/^chain,iteration/, 'replicate,chain,iteration');
  const lines = [head];
  const n = c.replicated[0]?.values.length ?? 0;
  for (let k = 0; k < n; k++) {
    const w = where(c.replicated[0].draws[k]);
    const parts: string[] = [String(k + 1), String(w.chain), String(w.iteration)];
    for (const r of c.replicated) for (const v of r.values[k]) parts.push(csvField(v));
    lines.push(parts.join(','));
  }
  return lines.join('\n') + '\n';
}
