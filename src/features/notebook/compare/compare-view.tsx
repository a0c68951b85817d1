/**
 * The compare cell: its settings (models, tested constraint lines, reference, prior odds), Run and
 * Cancel with the job's progress and queue place, and the newest finished comparison's results.
 * Readers (viewers, share links) see the settings read-only and the results.
 */
import { useEffect, useMemo, useState } from 'react';
import { compareContentSchema, type CompareContent } from '@shared/api/compare';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { errorMessage } from '@/lib/api-client';
import { MessageText } from '@/components/message-text';
import type { NotebookAccess } from '../api/access';
import { useCompareRuns } from '../api/get-compare-runs';
import { useQueueCompare } from '../api/queue-compare';
import { useCancelCompare } from '../api/cancel-compare';
import { CompareSettings, type CompareModelOption } from './compare-settings';
import { CompareProgress } from './compare-progress';
import { CompareResults } from './compare-results';

export interface CompareViewProps {
  cellId: string;
  access: NotebookAccess;
  readOnly: boolean;
  content: unknown;
  setContent: (c: CompareContent) => void;
  models: CompareModelOption[];
  /** Set by the page when Mod-Enter asks this cell to run. */
  runSignal: number;
}

export function CompareView(p: CompareViewProps) {
  const content = useMemo(() => {
    const r = compareContentSchema.safeParse(p.content ?? {});
    return r.success ? r.data : compareContentSchema.parse({ modelCellIds: [] });
  }, [p.content]);
  const runs = useCompareRuns(p.access, p.cellId);
  const member = p.access.mode === 'member' && !p.readOnly;
  const ws = p.access.mode === 'member' ? p.access.workspaceId : '';
  const queueMut = useQueueCompare(ws, p.access.notebookId, p.cellId);
  const cancelMut = useCancelCompare(ws, p.access.notebookId, p.cellId);
  const mut = p.access.mode === 'member' ? { queue: queueMut, cancel: cancelMut } : null;
  const [error, setError] = useState<string | null>(null);
  const list = runs.data?.runs ?? [];
  const active = list.find((r) => r.status === 'queued' || r.status === 'running') ?? null;
  const latest = list[0] ?? null;
  const shown = list.find((r) => r.status === 'done' && r.result) ?? null;

  const queue = (sensitivity: boolean) => {
    if (!mut) return;
    setError(null);
    mut.queue.mutate({ content, sensitivity }, { onError: (e) => setError(errorMessage(e)) });
  };
  useEffect(() => {
    if (p.runSignal > 0 && member && !active) queue(false);
  }, [p.runSignal]); // eslint-disable-line react-hooks/exhaustive-deps

  return (
    <div className="flex flex-col gap-4" data-testid="compare-cell">
      <CompareSettings content={content} models={p.models} readOnly={p.readOnly} onChange={p.setContent} />
      {member && (
        <div className="flex flex-wrap items-center gap-2">
          <Button onClick={() => queue(false)} disabled={!!active || content.modelCellIds.length === 0} pending={mut?.queue.isPending}>
            Run comparison
          </Button>
          {active && (
            <Button variant="secondary" onClick={() => mut?.cancel.mutate(active.id)} pending={mut?.cancel.isPending}>
              Cancel
            </Button>
          )}
        </div>
      )}
      {error && (
        <p className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink" role="alert">
          <MessageText text={error} />
        </p>
      )}
      {runs.isError && <Banner tone="notice">{errorMessage(runs.error)}</Banner>}
      {active && <CompareProgress run={active} />}
      {latest && latest.status === 'failed' && (!shown || latest.createdAt > shown.createdAt) && (
        <Banner tone="notice" title="The last comparison failed.">
          <MessageText text={latest.error ?? ''} />
        </Banner>
      )}
      {latest && latest.status === 'cancelled' && (!shown || latest.createdAt > shown.createdAt) && <p className="text-sm text-ink-soft">The last comparison was cancelled.</p>}
      {shown?.result ? (
        <>
          {shown.finishedAt && (
            <p className="text-sm text-ink-soft">
              Computed {new Date(shown.finishedAt).toLocaleString()}
              {shown.createdBy ? ` for ${shown.createdBy.name}` : ''} in {shown.result.seconds.toFixed(1)} s.
            </p>
          )}
          <CompareResults result={shown.result} onSensitivity={member && !active ? () => queue(true) : undefined} sensitivityPending={mut?.queue.isPending} />
        </>
      ) : (
        !active && !runs.isPending && <p className="text-sm text-ink-soft">No comparison has run yet{member ? ': pick the models and lines to test, then run it.' : '.'}</p>
      )}
    </div>
  );
}
