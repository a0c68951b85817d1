import type { Run } from '@shared/api/notebook';
import type { PlotDraws as RunDraws } from '@shared/draws-binary';
import { formatEstimate, formatSeconds } from '@/lib/estimates';
import { VerdictBanner } from './verdict-banner';
import { QuantityRows } from './quantity-rows';
import { FitPlots } from './fit-plots';
import { ChecksView } from './checks-view';
import { PriorRunHeading } from './prior-run-label';
import { buttonClass } from '@/components/ui/button';

export interface FitResultsProps {
  run: Run;
  draws: RunDraws | null;
  drawsError?: string | null;
  /** Links to the CSV exports (absent in views that cannot download). */
  exports?: { draws: string; summary: string };
}

/** A finished run: verdict first, then one row per quantity, the run's diagnostics, exports and figures. */
export function FitResults({ run, draws, drawsError, exports }: FitResultsProps) {
  const s = run.summary;
  if (!s) return null;
  const d = s.diagnostics;
  return (
    <div className="flex flex-col gap-4" data-testid="fit-results">
      <PriorRunHeading run={run} />
      <VerdictBanner verdict={s.verdict} />
      <QuantityRows quantities={s.quantities} chains={s.settings.chains} draws={s.settings.draws} distribution={run.settings.priorOnly ? 'prior' : 'posterior'} />
      <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" data-testid="run-diagnostics">
        {s.settings.chains} chains × {s.settings.draws} draws after {s.settings.warmup} warm-up · sampler {d.samplerUsed} ({d.samplerReason}) ·
        divergences <span className={d.divergences > 0 ? 'bg-alarm-soft font-bold text-alarm' : ''}>{d.divergences}</span>
        {d.rejectedSteps !== undefined ? ` · rejected steps ${d.rejectedSteps}` : ''} · acceptance {formatEstimate(d.acceptance, 2)} · step size{' '}
        {formatEstimate(d.stepSize, 2)}
        {d.efmi && d.efmi.length > 0 ? ` · E-FMI ${d.efmi.map((x) => formatEstimate(x, 2)).join(', ')}` : ''}
        {d.factorizationsPerStep !== undefined ? ` · ${formatEstimate(d.factorizationsPerStep, 2)} factorisations per step` : ''} · {formatSeconds(s.seconds)}
      </p>
      {exports && (
        <div className="flex flex-wrap gap-2">
          <a className={buttonClass('secondary', 'xs')} href={exports.draws} download>
            Draws CSV
          </a>
          <a className={buttonClass('secondary', 'xs')} href={exports.summary} download>
            Summary CSV
          </a>
        </div>
      )}
      {draws ? <FitPlots draws={draws} quantities={s.quantities} /> : drawsError ? <p className="truncate text-[0.8rem] text-ink-soft">Plots unavailable: {drawsError}</p> : <p className="truncate text-[0.8rem] text-ink-soft" style={{ minHeight: 300 }}>Loading draws for the plots…</p>}
      {s.checks && <ChecksView checks={s.checks} />}
    </div>
  );
}
