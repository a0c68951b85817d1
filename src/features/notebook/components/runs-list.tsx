import type { Run } from '@shared/api/notebook';
import { formatSeconds } from '@/lib/estimates';
import { formatDateTime } from '@/lib/format';
import { PriorRunBadge, isPriorRun } from '../fit/prior-run-label';

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
      <summary style={{ cursor: 'pointer', color: 'var(--sl-ink-soft)' }}>
        {runs.length} run{runs.length === 1 ? '' : 's'} of this cell
      </summary>
      <ul style={{ marginTop: '0.3rem' }}>
        {runs.map((r) => {
          const level = r.summary?.verdict.level;
          return (
            <li key={r.id} className="flex flex-wrap items-center gap-2" style={{ padding: '0.15rem 0' }}>
              <button type="button" className="sl-btn" aria-current={r.id === openId ? 'true' : undefined} disabled={r.id === openId} onClick={() => onOpen(r.id)}>
                {r.id === openId ? 'shown' : 'open'}
              </button>
              <span className="sl-num">{formatDateTime(r.createdAt)}</span>
              <span>{STATUS_WORDS[r.status]}</span>
              {isPriorRun(r) && <PriorRunBadge />}
              <span className="sl-cell-sub">
                {r.settings.chains}×{r.settings.draws} draws · seed {r.settings.seed}
                {r.summary ? ` · ${formatSeconds(r.summary.seconds)}` : ''}
              </span>
              {level && (
                <span className="sl-chip" data-tone={level === 'trustworthy' ? 'accent' : level === 'do-not-use' ? 'warning' : undefined}>
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
