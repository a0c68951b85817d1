/**
 * A finished comparison: the plain-words reading first, then the tested hypotheses (log BF with its
 * 95 % interval, prior and posterior mass of the tested region), the rows (log marginal likelihood,
 * log BF against the reference, posterior probability under the stated prior odds, leave-one-out
 * difference with Pareto-k warnings), the prior-scale sensitivity when it ran, and the caution that
 * Bayes factors depend on the priors with the button that reruns at halved and doubled prior scales.
 */
import type { CompareResult } from '@shared/api/compare';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Table, TBody, Td, Th, THead, Tr } from '@/components/ui/table';
import { factor, percent, pm } from './format';

export interface CompareResultsProps {
  result: CompareResult;
  /** Queue the sensitivity run (absent for readers). */
  onSensitivity?: () => void;
  sensitivityPending?: boolean;
}

export function CompareResults({ result: r, onSensitivity, sensitivityPending }: CompareResultsProps) {
  const factors = r.factors;
  const sens = factors.length > 1;
  return (
    <div className="flex flex-col gap-4 text-sm" data-testid="compare-results">
      <section aria-label="Reading" className="flex flex-col gap-1.5" data-testid="compare-reading">
        {r.reading.map((t, i) => (
          <p key={i}>{t}</p>
        ))}
      </section>

      {r.hypotheses.length > 0 && (
        <Table caption="Tested constraint lines">
          <THead>
            <Tr>
              <Th>Tested lines</Th>
              <Th numeric>log BF ± SE</Th>
              <Th numeric>Bayes factor (95 % interval)</Th>
              <Th numeric>Prior mass</Th>
              <Th numeric>Posterior mass</Th>
            </Tr>
          </THead>
          <TBody>
            {r.hypotheses.map((h, i) => (
              <Tr key={i} data-testid="compare-hypothesis">
                <Td>
                  <div className="font-medium">{h.modelLabel}</div>
                  {h.lines.map((l, j) => (
                    <div key={l} className="text-ink-soft">
                      line {l}: <code className="font-mono text-[0.8125rem]">{h.lineText[j]}</code>
                    </div>
                  ))}
                </Td>
                <Td numeric className="whitespace-nowrap" data-testid="hypothesis-logbf">{pm(h.logBF, h.se)}</Td>
                <Td numeric className="whitespace-nowrap" data-testid="hypothesis-interval">
                  {factor(Math.exp(h.logBF))} ({factor(Math.exp(h.interval[0]))} to {factor(Math.exp(h.interval[1]))})
                </Td>
                <Td numeric>{factor(Math.exp(h.logPriorMass.value))}</Td>
                <Td numeric>{factor(Math.exp(h.logPosteriorMass.value))}</Td>
              </Tr>
            ))}
          </TBody>
        </Table>
      )}

      <Table caption="Rows of the comparison">
        <THead>
          <Tr>
            <Th>Row</Th>
            <Th numeric>log marginal likelihood</Th>
            <Th numeric>log BF vs reference (95 % interval)</Th>
            <Th numeric>Prior odds</Th>
            <Th numeric>Posterior probability</Th>
            <Th numeric>elpd difference (LOO)</Th>
          </Tr>
        </THead>
        <TBody>
          {r.entries.map((e, i) => (
            <Tr key={i} data-testid="compare-row">
              <Td>
                <span className="font-medium">{e.label}</span>
                {e.logBF === null && <span className="ml-2 text-ink-soft">(reference)</span>}
              </Td>
              <Td numeric className="whitespace-nowrap">{pm(e.logML.value, e.logML.se)}</Td>
              <Td numeric className="whitespace-nowrap">
                {e.logBF === null || e.logBFSe === null || e.logBFInterval === null ? (
                  '—'
                ) : (
                  <>
                    {pm(e.logBF, e.logBFSe)}
                    <div className="text-ink-soft">
                      {e.logBFInterval[0].toFixed(2)} to {e.logBFInterval[1].toFixed(2)}
                    </div>
                  </>
                )}
              </Td>
              <Td numeric>{e.priorOdds}</Td>
              <Td numeric>{percent(e.posteriorProbability)}</Td>
              <Td numeric>
                {e.loo ? (
                  <>
                    {e.loo.diff !== null && e.loo.diffSe !== null ? pm(e.loo.diff, e.loo.diffSe, 1) : `elpd ${pm(e.loo.elpd, e.loo.se, 1)}`}
                    {e.loo.highKCount > 0 && (
                      <div className="text-notice" data-testid="pareto-k-warning">
                        k̂ &gt; {e.loo.kThreshold} at {e.loo.highK.slice(0, 3).map((x) => `${x.table} row ${x.row}`).join(', ')}
                        {e.loo.highKCount > 3 ? ` and ${e.loo.highKCount - 3} more` : ''}
                      </div>
                    )}
                  </>
                ) : (
                  '—'
                )}
                {e.looNote && <div className="text-ink-soft text-left text-[0.8125rem]">{e.looNote}</div>}
              </Td>
            </Tr>
          ))}
        </TBody>
      </Table>
      <p className="text-ink-soft">
        Intervals are ±1.96 standard errors of the Monte Carlo estimate ({r.replicates} replicates, seed {r.seed}); posterior probabilities are point values.
        {r.looReference && ` Leave-one-out differences are against ${r.entries.find((e) => e.key.modelCellId === r.looReference!.modelCellId && e.key.without.join() === r.looReference!.without.join())?.label ?? 'the first row with a fit'}.`}
      </p>

      {sens && (
        <Table caption="Prior sensitivity" className="mt-1">
          <THead>
            <Tr>
              <Th>log BF with every prior scale ×</Th>
              {factors.map((f) => (
                <Th key={f} numeric>
                  ×{f}
                </Th>
              ))}
            </Tr>
          </THead>
          <TBody>
            {r.hypotheses.map((h, i) => (
              <Tr key={`h${i}`} data-testid="sensitivity-row">
                <Td>
                  {h.modelLabel}: line{h.lines.length > 1 ? 's' : ''} {h.lines.join(', ')} tested
                </Td>
                {factors.map((f) => {
                  const s = h.sensitivity.find((x) => x.factor === f);
                  return (
                    <Td key={f} numeric>
                      {s ? pm(s.logBF, s.se) : '—'}
                    </Td>
                  );
                })}
              </Tr>
            ))}
            {r.entries
              .filter((e) => e.logBF !== null)
              .map((e, i) => (
                <Tr key={`e${i}`} data-testid="sensitivity-row">
                  <Td>
                    {e.label} vs {r.referenceLabel}
                  </Td>
                  {factors.map((f) => {
                    const s = e.sensitivity.find((x) => x.factor === f);
                    return (
                      <Td key={f} numeric>
                        {s && s.logBF !== null && s.logBFSe !== null ? pm(s.logBF, s.logBFSe) : '—'}
                      </Td>
                    );
                  })}
                </Tr>
              ))}
          </TBody>
        </Table>
      )}
      {sens && r.priorScales.length > 0 && (
        <div className="flex flex-col gap-1 text-ink-soft" data-testid="prior-scales">
          <p>What the sensitivity runs changed:</p>
          {r.priorScales.map((m) => (
            <div key={m.modelCellId}>
              <span className="font-medium text-ink">{m.modelLabel}</span>:{' '}
              {m.lines.length === 0 && 'no prior lines.'}
              {m.lines.map((l) => (
                <span key={l.line}>
                  line {l.line} ({[...l.scaled.map((s) => s.replace(/ × [\d.]+\)$/, ' scaled)').replace(/ ÷ [\d.]+\)$/, ' scaled)')), ...l.unscaled.map((u) => `not scaled: ${u}`)].join('; ')}){' '}
                </span>
              ))}
              {m.flatUnknowns.length > 0 && <span>Flat on the region, nothing to scale: {m.flatUnknowns.join(', ')}.</span>}
            </div>
          ))}
        </div>
      )}

      <Banner tone="info" title="Bayes factors depend on the priors">
        <span data-testid="compare-caution">{r.caution}</span>
        {onSensitivity && !sens && (
          <div className="mt-2">
            <Button variant="secondary" size="sm" onClick={onSensitivity} pending={sensitivityPending}>
              Rerun with prior scales ×0.5 and ×2
            </Button>
          </div>
        )}
      </Banner>

      {r.warnings.map((w, i) => (
        <Banner key={i} tone="notice" role="status">
          {w}
        </Banner>
      ))}
    </div>
  );
}
