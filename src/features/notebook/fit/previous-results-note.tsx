import type { Run } from '@shared/api/notebook';
import { formatDateTime } from '@/lib/format';

/** Says that the results shown are the previous fit's while a newer fit waits or runs. */
export function PreviousResultsNote({ shown, active }: { shown: Run | null; active: Run | null }) {
  if (!shown || !active || shown.createdAt >= active.createdAt) return null;
  return (
    <p className="text-[0.8rem] text-ink-soft" role="note" data-testid="previous-results">
      <strong className="font-semibold text-ink">Previous results</strong> — from the fit started{' '}
      <span className="num">{formatDateTime(shown.createdAt)}</span>; they are replaced when the fit now {active.status === 'queued' ? 'waiting' : 'running'} finishes.
    </p>
  );
}
