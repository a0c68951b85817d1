import { Fragment } from 'react';
import type { QuantitySummary } from '@shared/fit';
import { DIAGNOSTIC_THRESHOLDS, essFails, essNeeded, rhatFails } from '@shared/diagnostics';
import { familyOf } from './mixing';
import { formatEss, formatEstimate, formatRhat } from '@/lib/estimates';
import { useQuantityLabel } from '../quantity-labels';

export interface QuantityRowsProps {
  quantities: QuantitySummary[];
  chains: number;
  /** Kept draws per chain. */
  draws: number;
  /** 'prior' for a run with the likelihood left out: the rows then describe the prior. */
  distribution?: 'posterior' | 'prior';
}

/** Why a quantity's own mixing figures fail, in words (empty when they pass). */
/**
 * On a phone (≤ 520 px) the mixing table is laid out as one block per quantity: its name across the
 * top, then its six figures in three columns, each under its own label (from data-label), so no
 * column is cut off or hidden behind a sideways scroll.
 */
const PHONE_TABLE =
  'max-[520px]:block max-[520px]:[&_thead]:hidden max-[520px]:[&_tbody]:block max-[520px]:[&_tr]:grid max-[520px]:[&_tr]:grid-cols-3 ' +
  'max-[520px]:[&_tr]:border-b max-[520px]:[&_tr]:border-rule-strong max-[520px]:[&_th]:border-b-0 max-[520px]:[&_td]:border-b-0 max-[520px]:[&_td]:text-left ' +
  'max-[520px]:[&_td]:before:block max-[520px]:[&_td]:before:whitespace-normal max-[520px]:[&_td]:before:font-sans max-[520px]:[&_td]:before:text-[0.65rem] ' +
  'max-[520px]:[&_td]:before:text-ink-soft max-[520px]:[&_td]:before:content-[attr(data-label)]';

export function mixingProblems(q: QuantitySummary, chains: number): string[] {
  const out: string[] = [];
  if (rhatFails(q.rhat)) out.push(`chains disagree (R̂ ${formatRhat(q.rhat)} > ${DIAGNOSTIC_THRESHOLDS.rhatRunLonger})`);
  if (essFails(q.essBulk, chains)) out.push(`too few independent draws in the middle (${formatEss(q.essBulk)} < ${essNeeded(chains)})`);
  if (essFails(q.essTail, chains)) out.push(`too few independent draws in the tails (${formatEss(q.essTail)} < ${essNeeded(chains)})`);
  return out;
}

/** The axis each row is drawn on: shared by a family (mu[1], mu[2], …), padded a little. */
function familyAxes(quantities: QuantitySummary[]): Map<string, [number, number]> {
  const m = new Map<string, [number, number]>();
  for (const q of quantities) {
    const f = `${q.kind}:${familyOf(q.name)}`;
    const cur = m.get(f) ?? [Infinity, -Infinity];
    m.set(f, [Math.min(cur[0], q.q5), Math.max(cur[1], q.q95)]);
  }
  for (const [f, [lo, hi]] of m) {
    const span = hi - lo || Math.max(Math.abs(lo), 1) * 0.1;
    m.set(f, [lo - 0.08 * span, hi + 0.08 * span]);
  }
  return m;
}

const W = 320;
const H = 22;

/** The 90 % interval as a bar, the median as a tick, the mean as a small ring; zero marked when in view. */
function IntervalMark({ q, axis }: { q: QuantitySummary; axis: [number, number] }) {
  const [lo, hi] = axis;
  const x = (v: number) => 4 + ((v - lo) / (hi - lo || 1)) * (W - 8);
  const zero = lo < 0 && hi > 0 ? x(0) : null;
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="block h-[22px] w-full" role="img" aria-label={`90 % interval ${formatEstimate(q.q5)} to ${formatEstimate(q.q95)}, median ${formatEstimate(q.q50)}`}>
      <line x1={4} x2={W - 4} y1={H / 2} y2={H / 2} stroke="var(--color-rule)" />
      {zero !== null && <line x1={zero} x2={zero} y1={3} y2={H - 3} stroke="var(--color-rule-strong)" strokeDasharray="2 2" />}
      <line x1={x(q.q5)} x2={x(q.q95)} y1={H / 2} y2={H / 2} stroke="var(--color-ink-soft)" strokeWidth="5" strokeLinecap="round" opacity="0.55" />
      <line x1={x(q.q50)} x2={x(q.q50)} y1={3} y2={H - 3} stroke="var(--color-ink)" strokeWidth="2.2" />
      <circle cx={x(q.mean)} cy={H / 2} r="2.6" fill="var(--color-sheet)" stroke="var(--color-ink)" strokeWidth="1" />
    </svg>
  );
}

/**
 * The results, one quantity a row: name, its 90 % interval drawn inline with the median marked,
 * the numbers, and a trust mark from that quantity's own R̂ and ESS (the shared thresholds). The
 * mixing figures themselves sit behind a fold.
 */
export function QuantityRows({ quantities, chains, draws, distribution = 'posterior' }: QuantityRowsProps) {
  const axes = familyAxes(quantities);
  const nameLabel = useQuantityLabel();
  const total = chains * draws;
  const cap = total * Math.log10(Math.max(10, total));
  const anyAbove = quantities.some((q) => q.essBulk > total || q.essTail > total);
  const anyCapped = quantities.some((q) => q.essBulk >= cap * (1 - 1e-9) || q.essTail >= cap * (1 - 1e-9));
  const groups: [string, QuantitySummary[]][] = [
    ['unknowns', quantities.filter((q) => q.kind === 'unknown')],
    ['derived', quantities.filter((q) => q.kind === 'derived')],
  ];
  const essNote = (e: number) => (e >= cap * (1 - 1e-9) ? '‡' : e > total ? '†' : '');
  return (
    <div className="flex flex-col gap-2" data-testid="summary-table">
      <div className="grid grid-cols-[1.4rem_minmax(5rem,9rem)_minmax(8rem,1fr)_minmax(7rem,12rem)] items-center gap-[0.6rem] border-b border-rule py-[0.15rem] text-[0.85rem] max-[520px]:grid-cols-[1.4rem_minmax(0,1fr)_minmax(0,1fr)] max-[520px]:gap-y-[0.1rem] max-[520px]:[grid-template-areas:'mark_name_nums'_'fig_fig_fig'] max-[520px]:[&>:nth-child(1)]:[grid-area:mark] max-[520px]:[&>:nth-child(2)]:[grid-area:name] max-[520px]:[&>:nth-child(3)]:[grid-area:fig] max-[520px]:[&>:nth-child(4)]:[grid-area:nums] text-[0.68rem] text-ink-soft border-b-rule-strong" aria-hidden>
        <span />
        <span>quantity</span>
        <span className="max-[520px]:hidden">90 % of the {distribution} · median │ · mean ○</span>
        <span className="flex flex-wrap justify-end gap-x-[0.6rem] tabular-nums">median · 90 % interval</span>
      </div>
      {groups.map(([label, list]) =>
        list.length === 0 ? null : (
          <Fragment key={label}>
            {label === 'derived' && <div className="text-[0.65rem] font-medium tracking-[0.08em] text-ink-soft uppercase" style={{ paddingTop: '0.3rem' }}>derived</div>}
            {list.map((q) => {
              const problems = mixingProblems(q, chains);
              const ok = problems.length === 0;
              return (
                <div key={q.name} className="grid grid-cols-[1.4rem_minmax(5rem,9rem)_minmax(8rem,1fr)_minmax(7rem,12rem)] items-center gap-[0.6rem] border-b border-rule py-[0.15rem] text-[0.85rem] max-[520px]:grid-cols-[1.4rem_minmax(0,1fr)_minmax(0,1fr)] max-[520px]:gap-y-[0.1rem] max-[520px]:[grid-template-areas:'mark_name_nums'_'fig_fig_fig'] max-[520px]:[&>:nth-child(1)]:[grid-area:mark] max-[520px]:[&>:nth-child(2)]:[grid-area:name] max-[520px]:[&>:nth-child(3)]:[grid-area:fig] max-[520px]:[&>:nth-child(4)]:[grid-area:nums]" data-testid="quantity-row" data-failing={ok ? undefined : true}>
                  <span
                    className={ok ? 'inline-grid size-[1.1rem] place-items-center rounded-full border border-rule-strong text-[0.7rem] text-ink-soft' : 'inline-grid size-[1.1rem] place-items-center rounded-full border border-rule-strong text-[0.7rem] text-ink-soft border-alarm bg-alarm font-bold text-white'}
                    role="img"
                    aria-label={ok ? 'mixed well: the chains agree and there are enough independent draws' : `not settled: ${problems.join('; ')}`}
                    title={ok ? 'Chains agree and there are enough independent draws for this quantity.' : `Not settled: ${problems.join('; ')}.`}
                  >
                    {ok ? '✓' : '!'}
                  </span>
                  <span data-testid="quantity-name" className="font-mono tabular-nums truncate max-[520px]:whitespace-normal max-[520px]:[overflow-wrap:anywhere]" title={nameLabel(q.name)}>{nameLabel(q.name)}</span>
                  <span>
                    <IntervalMark q={q} axis={axes.get(`${q.kind}:${familyOf(q.name)}`)!} />
                  </span>
                  <span className="flex flex-wrap justify-end gap-x-[0.6rem] tabular-nums font-mono tabular-nums">
                    <strong>{formatEstimate(q.q50)}</strong>
                    <span className="text-ink-soft">
                      {formatEstimate(q.q5)} to {formatEstimate(q.q95)}
                    </span>
                  </span>
                </div>
              );
            })}
          </Fragment>
        ),
      )}
      <details className="[&>summary]:cursor-pointer [&>summary]:py-[0.3rem] [&>summary]:text-[0.8rem] [&>summary]:text-ink-soft" data-testid="mixing-figures">
        <summary>How well the chains mixed, quantity by quantity</summary>
        <div className="overflow-x-auto">
          <table className={`w-full border-collapse text-[0.82rem] [&_th]:border-b [&_th]:border-rule-strong [&_th]:px-[0.6rem] [&_th]:py-[0.3rem] [&_th]:text-right [&_th]:font-medium [&_th]:whitespace-nowrap [&_th]:text-ink-soft [&_td]:border-b [&_td]:border-rule [&_td]:px-[0.6rem] [&_td]:py-1 [&_th:first-child]:text-left [&_td:first-child]:text-left [&_tbody_tr:hover_td]:bg-slack/5 ${PHONE_TABLE}`} style={{ marginTop: '0.4rem' }} data-testid="mixing-table">
            <thead>
              <tr>
                <th scope="col">quantity</th>
                <th scope="col" title={`rank-normalised split-R̂; at most ${DIAGNOSTIC_THRESHOLDS.rhatRunLonger} passes`}>chains agree (R̂)</th>
                <th scope="col" title={`bulk effective sample size; at least ${essNeeded(chains)} passes`}>independent draws, middle</th>
                <th scope="col" title={`tail effective sample size (5 % and 95 % quantiles); at least ${essNeeded(chains)} passes`}>independent draws, tails</th>
                <th scope="col" title="Monte Carlo standard error of the mean">MC error of the mean</th>
                <th scope="col">mean</th>
                <th scope="col">sd</th>
              </tr>
            </thead>
            <tbody>
              {quantities.map((q) => {
                const rf = rhatFails(q.rhat);
                const bf = essFails(q.essBulk, chains);
                const tf = essFails(q.essTail, chains);
                return (
                  <tr key={q.name}>
                    <th scope="row" className="font-mono tabular-nums max-[520px]:col-span-3 max-[520px]:[overflow-wrap:anywhere]" style={{ textAlign: 'left', fontWeight: 500 }}>{nameLabel(q.name)}</th>
                    <td data-label="chains agree (R̂)" className={`font-mono tabular-nums text-right whitespace-nowrap${rf ? ' bg-alarm-soft font-bold text-alarm' : ''}`}>{formatRhat(q.rhat)}</td>
                    <td data-label="independent draws, middle" className={`font-mono tabular-nums text-right whitespace-nowrap${bf ? ' bg-alarm-soft font-bold text-alarm' : ''}`}>{formatEss(q.essBulk)}{essNote(q.essBulk)}</td>
                    <td data-label="independent draws, tails" className={`font-mono tabular-nums text-right whitespace-nowrap${tf ? ' bg-alarm-soft font-bold text-alarm' : ''}`}>{formatEss(q.essTail)}{essNote(q.essTail)}</td>
                    <td data-label="MC error of the mean" className="font-mono tabular-nums text-right whitespace-nowrap">{formatEstimate(q.mcseMean, 2)}</td>
                    <td data-label="mean" className="font-mono tabular-nums text-right whitespace-nowrap">{formatEstimate(q.mean)}</td>
                    <td data-label="sd" className="font-mono tabular-nums text-right whitespace-nowrap">{formatEstimate(q.sd)}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" data-testid="mixing-words">
          A quantity passes when its chains agree (R̂ at most {DIAGNOSTIC_THRESHOLDS.rhatRunLonger}) and its draws are worth at least{' '}
          {DIAGNOSTIC_THRESHOLDS.essPerChain} independent ones per chain ({essNeeded(chains)} here) both in the middle and in the tails.
        </p>
        {anyAbove && (
          <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" data-testid="ess-note-above">
            † More independent draws than draws ({total.toLocaleString('en')}): successive draws swing to opposite sides of the mean, so averages settle faster than
            with independent draws. This is real, not an error.
          </p>
        )}
        {anyCapped && (
          <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" data-testid="ess-note-capped">
            ‡ At the ceiling of {formatEss(cap)} (draws × log₁₀ draws): the estimate is held there so that a few strongly alternating draws cannot claim
            unlimited precision; the true figure may be higher.
          </p>
        )}
      </details>
    </div>
  );
}
