/**
 * The five cell kinds on the notebook page, each wired to its data: drafts autosave through the
 * versioned save, data cells upload and preview, model cells check as you type, fit cells queue
 * runs and follow them, compare cells queue comparisons and show their results (../compare/).
 */
import { useEffect, useMemo, useState } from 'react';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { fitContentSchema, dataContentSchema, type NbCell } from '@shared/api/notebook';
import { fitSettingsSchema, type FitSettings } from '@shared/fit';
import type { DataSchema } from '@shared/lang';
import { ModelEditor } from '@/features/model-editor';
import { errorMessage } from '@/lib/api-client';
import { DataPreview } from './data-preview';
import { DataUpload } from './data-upload';
import { ModelSidePanel } from './model-side-panel';
import { FitSettingsForm } from './fit-settings-form';
import { ChainProgress, runStateMessage } from './chain-progress';
import { FitResults } from './fit-results';
import { RunsList } from './runs-list';
import { CompareView } from '../compare/compare-view';
import { NotesCell } from './notes-cell';
import { MessageText } from '@/components/message-text';
import { datasetQuery, runExportLinks, uploadDataset, useCellRuns, useModelCheck, useRunDraws, useRunMutations, useSharedModelCheck, type NotebookAccess } from '../api/notebook-api';

export interface CellViewProps {
  cell: NbCell;
  access: NotebookAccess;
  readOnly: boolean;
  /** Draft of this cell (text and content) with its setters. */
  source: string;
  content: unknown;
  setSource: (s: string) => void;
  setContent: (c: unknown) => void;
  /** Every cell of the notebook (fit and compare cells pick model cells from it). */
  cells: NbCell[];
  /** Tables bound by data cells, for the model editor's completion and checks. */
  schema: DataSchema;
  /** Set by the page when Mod-Enter asks this cell to run. */
  runSignal: number;
  editingNotes: boolean;
  setEditingNotes: (v: boolean) => void;
  /** Runs this cell as Mod-Enter does (for editors that take the key before the column sees it). */
  onRun?: () => void;
}

export function NotesCellView(p: CellViewProps) {
  return <NotesCell text={p.source} editing={p.editingNotes} readOnly={p.readOnly} onChange={p.setSource} onEditingChange={p.setEditingNotes} />;
}

export function DataCellView(p: CellViewProps) {
  const content = dataContentSchema.safeParse(p.content);
  const datasetId = content.success ? content.data.datasetId : null;
  const preview = useQuery({ ...datasetQuery(p.access, datasetId ?? ''), enabled: datasetId !== null });
  const qc = useQueryClient();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [replacing, setReplacing] = useState(false);

  const upload = async (file: File, name: string) => {
    if (p.access.mode !== 'member') return;
    setBusy(true);
    setError(null);
    try {
      const res = await uploadDataset(p.access.workspaceId, file, name);
      qc.setQueryData(datasetQuery(p.access, res.dataset.id).queryKey, res);
      p.setContent({ datasetId: res.dataset.id });
      setReplacing(false);
    } catch (e) {
      setError(errorMessage(e));
    } finally {
      setBusy(false);
    }
  };

  return (
    <div className="flex flex-col gap-3">
      {datasetId === null ? (
        p.readOnly ? <p className="sl-cell-sub">No table uploaded yet.</p> : <DataUpload busy={busy} error={error} onUpload={upload} />
      ) : preview.isPending ? (
        <p className="sl-cell-sub">Loading the table…</p>
      ) : preview.isError ? (
        <p className="sl-field-error">Could not load the table: {errorMessage(preview.error)}</p>
      ) : (
        <>
          <DataPreview dataset={preview.data.dataset} rows={preview.data.rows} />
          {!p.readOnly &&
            (replacing ? (
              <DataUpload busy={busy} error={error} onUpload={upload} />
            ) : (
              <div>
                <button type="button" className="sl-btn sl-btn-outline" onClick={() => setReplacing(true)}>
                  Replace the table
                </button>
              </div>
            ))}
        </>
      )}
    </div>
  );
}

export function ModelCellView(p: CellViewProps) {
  const [debounced, setDebounced] = useState(p.source);
  useEffect(() => {
    const t = setTimeout(() => setDebounced(p.source), 600);
    return () => clearTimeout(t);
  }, [p.source]);
  // Every member checks through the workspace (readers included: a check changes nothing);
  // share-link readers ask for the stored cell's check.
  const member = p.access.mode === 'member';
  const memberCheck = useModelCheck(p.access.mode === 'member' ? p.access.workspaceId : '', p.access.notebookId, debounced, member);
  const sharedCheck = useSharedModelCheck(p.access.mode === 'share' ? p.access.token : '', p.cell.id, p.cell.source, p.access.mode === 'share');
  const check = member ? memberCheck : sharedCheck;
  return (
    <div className="sl-model-grid">
      <div style={{ minWidth: 0 }}>
        <ModelEditor value={p.source} onChange={p.setSource} schema={p.schema} readOnly={p.readOnly} label="Model program" onRun={() => p.onRun?.()} />
      </div>
      <ModelSidePanel check={check.data ?? null} checking={check.isFetching} readOnly={p.readOnly} />
    </div>
  );
}

/** A label for a model cell in pickers: its first comment line, else its first unknown. */
export function modelLabel(cell: NbCell, index: number): string {
  const comment = cell.source.split('\n').find((l) => l.trim().startsWith('#'));
  if (comment) return comment.replace(/^\s*#+\s*/, '').slice(0, 60) || `Model ${index + 1}`;
  const unknown = cell.source.match(/^\s*unknown\s+([A-Za-z_]\w*)/m);
  return unknown ? `Model with ${unknown[1]}` : `Model cell ${index + 1}`;
}

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
  const allMut = useRunMutations(p.access.mode === 'member' ? p.access.workspaceId : '', p.access.notebookId, p.cell.id);
  const mut = member ? allMut : null;
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
        <label htmlFor={`fit-model-${p.cell.id}`} className="sl-cell-sub">
          Fits
        </label>
        <select
          id={`fit-model-${p.cell.id}`}
          className="sl-input"
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
        <p className="sl-field-error" role="alert">
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
        <p className="sl-banner" role="alert">
          <strong>The last fit failed.</strong> <MessageText text={latest.error ?? ''} />
        </p>
      )}
      {latest && latest.status === 'cancelled' && (!shown || latest.createdAt > shown.createdAt) && <p className="sl-cell-sub">The last fit was cancelled.</p>}
      {shown?.partial && (
        <p className="sl-banner" role="note">
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

export function CompareCellView(p: CellViewProps) {
  const models = useMemo(() => p.cells.filter((c) => c.kind === 'model').map((c, i) => ({ id: c.id, label: modelLabel(c, i), source: c.source })), [p.cells]);
  return <CompareView cellId={p.cell.id} access={p.access} readOnly={p.readOnly} content={p.content} setContent={p.setContent} models={models} runSignal={p.runSignal} />;
}
