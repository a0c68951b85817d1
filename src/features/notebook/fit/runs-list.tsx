import type { Run } from '@shared/api/notebook';
import { formatSeconds } from '@/lib/estimates';
import { formatDateTime } from '@/lib/format';
import { PriorRunBadge, isPriorRun } from './prior-run-label';
import { buttonClass } from '@/components/ui/button';

const STATUS_WORDS: Record<Run['status'], string> = {
  queued: 'waiting',
  running: 'running',
  done: 'finished',
  failed: 'failed',
  cancelled: 'cancelled',
};

/** Past runs of a fit cell, newest first; any finished run can be reopened. */
export function RunsList({ runs, openId, onOpen }: { runs: Run[]; openId: string | null; onOpen: (id: string) => void }) {
  if (runs.length === 0) return null;
  return (
    <details className="text-sm" data-testid="runs-list">
      <summary style={{ cursor: 'pointer', color: 'var(--color-ink-soft)' }}>
        {runs.length} run{runs.length === 1 ? '' : 's'} of this cell
      </summary>
      <ul style={{ marginTop: '0.3rem' }}>
        {runs.map((r) => {
          const level = r.summary?.verdict.level;
          return (
            <li key={r.id} className="flex flex-wrap items-center gap-2" style={{ padding: '0.15rem 0' }}>
              <button type="button" className={buttonClass('quiet', 'xs')} aria-current={r.id === openId ? 'true' : undefined} disabled={r.id === openId} onClick={() => onOpen(r.id)}>
                {r.id === openId ? 'shown' : 'open'}
              </button>
              <span className="font-mono tabular-nums text-right whitespace-nowrap">{formatDateTime(r.createdAt)}</span>
              <span>{STATUS_WORDS[r.status]}</span>
              {isPriorRun(r) && <PriorRunBadge />}
              <span className="truncate text-[0.8rem] text-ink-soft">
                {r.settings.chains}×{r.settings.draws} draws · seed {r.settings.seed}
                {r.summary ? ` · ${formatSeconds(r.summary.seconds)}` : ''}
              </span>
              {level && (
                <span className="inline-flex items-center gap-1 rounded-full border border-rule-strong px-[0.45rem] py-[0.1rem] text-[0.72rem] text-ink-soft data-[tone=accent]:border-slack data-[tone=accent]:text-slack data-[tone=warning]:border-alarm data-[tone=warning]:font-semibold data-[tone=warning]:text-alarm" data-tone={level === 'trustworthy' ? 'accent' : level === 'do-not-use' ? 'warning' : undefined}>
                  {level === 'trustworthy' ? 'trustworthy' : level === 'run-longer' ? 'run longer' : 'do not use'}
                </span>
              )}
            </li>
          );
        })}
      </ul>
    </details>
  );
}
