import type { QuantitySummary } from '@shared/fit';
import { essFails, rhatFails, DIAGNOSTIC_THRESHOLDS } from '@shared/diagnostics';
const RHAT_LIMIT = DIAGNOSTIC_THRESHOLDS.rhatRunLonger;
const ESS_PER_CHAIN = DIAGNOSTIC_THRESHOLDS.essPerChain;
import { formatEss, formatEstimate, formatRhat } from '@/lib/estimates';

export interface SummaryTableProps {
  quantities: QuantitySummary[];
  chains: number;
}

/**
 * Posterior summary: mean, sd, 5/50/95 % quantiles, R̂, bulk- and tail-ESS, MCSE of the mean.
 * Failing R̂ and ESS cells use the warning colour (thresholds in lib/diagnostic-thresholds).
 */
export function SummaryTable({ quantities, chains }: SummaryTableProps) {
  const essLimit = ESS_PER_CHAIN * Math.max(1, chains);
  const unknowns = quantities.filter((q) => q.kind === 'unknown');
  const derived = quantities.filter((q) => q.kind === 'derived');
  const row = (q: QuantitySummary) => {
    const rf = rhatFails(q.rhat);
    const bf = essFails(q.essBulk, chains);
    const tf = essFails(q.essTail, chains);
    const failing = rf || bf || tf;
    return (
      <tr key={q.name} data-failing={failing || undefined}>
        <th scope="row" className="sl-mono" style={{ textAlign: 'left', color: 'var(--sl-ink)', fontWeight: 500, borderBottom: '1px solid var(--sl-rule)' }}>
          {q.name}
        </th>
        <td className="sl-num">{formatEstimate(q.mean)}</td>
        <td className="sl-num">{formatEstimate(q.sd)}</td>
        <td className="sl-num">{formatEstimate(q.q5)}</td>
        <td className="sl-num">{formatEstimate(q.q50)}</td>
        <td className="sl-num">{formatEstimate(q.q95)}</td>
        <td className={`sl-num${rf ? ' sl-fail' : ''}`} title={rf ? `R̂ should be at most ${RHAT_LIMIT}` : undefined}>{formatRhat(q.rhat)}</td>
        <td className={`sl-num${bf ? ' sl-fail' : ''}`} title={bf ? `bulk-ESS should be at least ${essLimit}` : undefined}>{formatEss(q.essBulk)}</td>
        <td className={`sl-num${tf ? ' sl-fail' : ''}`} title={tf ? `tail-ESS should be at least ${essLimit}` : undefined}>{formatEss(q.essTail)}</td>
        <td className="sl-num">{formatEstimate(q.mcseMean, 2)}</td>
      </tr>
    );
  };
  return (
    <div className="overflow-x-auto" data-testid="summary-table">
      <table className="sl-table">
        <thead>
          <tr>
            <th scope="col">quantity</th>
            <th scope="col">mean</th>
            <th scope="col">sd</th>
            <th scope="col">5 %</th>
            <th scope="col">50 %</th>
            <th scope="col">95 %</th>
            <th scope="col" title={`rank-normalised split-R̂; at most ${RHAT_LIMIT} passes`}>R̂</th>
            <th scope="col" title={`at least ${essLimit} passes`}>bulk-ESS</th>
            <th scope="col" title={`at least ${essLimit} passes`}>tail-ESS</th>
            <th scope="col" title="Monte Carlo standard error of the mean">MCSE</th>
          </tr>
        </thead>
        <tbody>
          {unknowns.map(row)}
          {derived.length > 0 && (
            <tr>
              <td colSpan={10} className="sl-type" style={{ paddingTop: '0.6rem' }}>
                derived
              </td>
            </tr>
          )}
          {derived.map(row)}
        </tbody>
      </table>
    </div>
  );
}
