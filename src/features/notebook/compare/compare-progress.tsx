/** A queued or running comparison: its place in the queue, or which log Z, replicate and stage it is at. */
import type { CompareRun } from '@shared/api/compare';
import { Banner } from '@/components/ui/banner';

export function compareStateMessage(run: Pick<CompareRun, 'status' | 'worker' | 'queuePosition'>): string | null {
  if (run.status === 'queued') {
    if (!run.queuePosition) return 'Waiting for a worker to pick up this comparison…';
    return run.queuePosition === 1 ? 'Waiting for a free slot: this comparison is next in the queue.' : `Waiting for a free slot: number ${run.queuePosition} in the queue.`;
  }
  if (run.status === 'running' && run.worker === 'lost') return 'Worker lost: the comparison starts again as soon as a worker picks it up.';
  return null;
}

export function CompareProgress({ run }: { run: CompareRun }) {
  const msg = compareStateMessage(run);
  const p = run.progress;
  // Finished log Z and replicates (the stages of a replicate are not known in advance).
  const frac = p ? Math.min(1, (p.step - 1 + (p.replicate - 1) / p.replicates) / p.steps) : 0;
  return (
    <div className="flex flex-col gap-2 text-sm" data-testid="compare-progress">
      {msg && (run.worker === 'lost' ? <Banner tone="notice">{msg}</Banner> : <p className="text-ink-soft" role="status">{msg}</p>)}
      {run.status === 'running' && (
        <>
          <div className="h-1.5 overflow-hidden rounded-[3px] bg-rule" role="progressbar" aria-label="comparison" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(frac * 100)}>
            <div className="h-full bg-slack transition-[width] duration-300 ease-linear" style={{ width: `${Math.round(frac * 100)}%` }} />
          </div>
          <p className="text-ink-soft" role="status">
            {p
              ? `log Z ${p.step} of ${p.steps}: ${p.what} — replicate ${p.replicate} of ${p.replicates}, annealing stage ${p.stage}`
              : 'Starting: reading the models, their tables and fits…'}
          </p>
        </>
      )}
    </div>
  );
}
