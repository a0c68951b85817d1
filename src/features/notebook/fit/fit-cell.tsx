/**
 * A fit cell: picks a model cell, edits the fit settings, queues runs and follows them, and shows
 * the chosen run's results.
 */
import { useEffect, useState } from 'react';
import { fitContentSchema } from '@shared/api/notebook';
import { fitSettingsSchema, type FitSettings } from '@shared/fit';
import { errorMessage } from '@/lib/api-client';
import { MessageText } from '@/components/message-text';
import { useCellRuns } from '../api/get-cell-runs';
import { useRunDraws } from '../api/get-run-draws';
import { useQueueRun } from '../api/queue-run';
import { useCancelRun } from '../api/cancel-run';
import { runExportLinks } from '../api/export-run';
import type { CellViewProps } from '../components/cell-view-props';
import { modelLabel } from '../model/model-label';
import { FitSettingsForm } from './fit-settings-form';
import { ChainProgress, runStateMessage } from './chain-progress';
import { FitResults } from './fit-results';
import { RunsList } from './runs-list';
import { compactControlClass } from '@/components/ui/input';

export function FitCellView(p: CellViewProps) {
  const parsed = fitContentSchema.safeParse(p.content);
  const content = parsed.success ? parsed.data : { modelCellId: null, settings: fitSettingsSchema.parse({}) };
  const models = p.cells.filter((c) => c.kind === 'model');
  // Default to the nearest model cell above this fit cell.
  const above = models.filter((c) => c.position < p.cell.position);
  const modelId = content.modelCellId ?? above[above.length - 1]?.id ?? models[0]?.id ?? null;

  const runs = useCellRuns(p.access, p.cell.id);
  const list = runs.data?.runs ?? [];
  const [openId, setOpenId] = useState<string | null>(null);
  const latest = list[0] ?? null;
  const shown = (openId ? list.find((r) => r.id === openId) : null) ?? list.find((r) => r.status === 'done') ?? null;
  const active = latest && (latest.status === 'queued' || latest.status === 'running') ? latest : null;
  const draws = useRunDraws(p.access, shown?.status === 'done' ? shown.id : null);
  const member = p.access.mode === 'member';
  const wsId = p.access.mode === 'member' ? p.access.workspaceId : '';
  const queue = useQueueRun(wsId, p.access.notebookId, p.cell.id);
  const cancel = useCancelRun(wsId, p.access.notebookId, p.cell.id);
  const mut = member ? { start: queue, cancel } : null;
  const [runError, setRunError] = useState<string | null>(null);

  const setSettings = (settings: FitSettings) => p.setContent({ modelCellId: modelId, settings });
  const run = (settings: FitSettings) => {
    if (!mut || !modelId) return;
    setRunError(null);
    if (content.modelCellId !== modelId || JSON.stringify(content.settings) !== JSON.stringify(settings)) p.setContent({ modelCellId: modelId, settings });
    mut.start.mutate({ settings, modelCellId: modelId }, {
      onSuccess: () => setOpenId(null),
      onError: (e) => setRunError(errorMessage(e)),
    });
  };

  // Mod-Enter on this cell starts a run with the saved settings.
  useEffect(() => {
    if (p.runSignal > 0 && !p.readOnly && !active) run(content.settings);
  }, [p.runSignal]); // eslint-disable-line react-hooks/exhaustive-deps

  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-wrap items-center gap-2 text-sm">
        <label htmlFor={`fit-model-${p.cell.id}`} className="truncate text-[0.8rem] text-ink-soft">
          Fits
        </label>
        <select
          id={`fit-model-${p.cell.id}`}
          className={compactControlClass}
          style={{ width: 'auto', fontFamily: 'inherit' }}
          value={modelId ?? ''}
          disabled={p.readOnly}
          onChange={(e) => p.setContent({ modelCellId: e.target.value || null, settings: content.settings })}
        >
          {models.length === 0 && <option value="">no model cell yet</option>}
          {models.map((m, i) => (
            <option key={m.id} value={m.id}>
              {modelLabel(m, i)}
            </option>
          ))}
        </select>
      </div>
      <FitSettingsForm
        value={content.settings}
        readOnly={p.readOnly}
        running={!!active || (mut?.start.isPending ?? false)}
        onChange={setSettings}
        onRun={run}
        onCancel={active && mut ? () => mut.cancel.mutate(active.id) : undefined}
      />
      {runError && (
        <p className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink" role="alert">
          <MessageText text={runError} />
        </p>
      )}
      {active && (
        <ChainProgress
          progress={active.progress}
          chains={active.settings.chains}
          queuedMessage={runStateMessage(active)?.text}
          warning={runStateMessage(active)?.warning ?? false}
        />
      )}
      {latest && latest.status === 'failed' && (!shown || latest.createdAt > shown.createdAt) && (
        <p className="rounded-[3px] border border-rule-strong bg-sheet px-[0.9rem] py-[0.55rem] text-[0.85rem]" role="alert">
          <strong>The last fit failed.</strong> <MessageText text={latest.error ?? ''} />
        </p>
      )}
      {latest && latest.status === 'cancelled' && (!shown || latest.createdAt > shown.createdAt) && <p className="truncate text-[0.8rem] text-ink-soft">The last fit was cancelled.</p>}
      {shown?.partial && (
        <p className="rounded-[3px] border border-rule-strong bg-sheet px-[0.9rem] py-[0.55rem] text-[0.85rem]" role="note">
          <strong>Partial fit.</strong> It reached the time limit with {shown.summary?.settings.chains ?? 'some'} of {shown.settings.chains} chains
          finished; the summary, diagnostics and draws cover those chains.
        </p>
      )}
      {shown && (
        <FitResults
          run={shown}
          draws={draws.data ?? null}
          drawsError={draws.isError ? errorMessage(draws.error) : null}
          exports={member && p.access.mode === 'member' ? runExportLinks(p.access.workspaceId, shown.id) : undefined}
        />
      )}
      <RunsList runs={list} openId={shown?.id ?? null} onOpen={setOpenId} />
    </div>
  );
}
