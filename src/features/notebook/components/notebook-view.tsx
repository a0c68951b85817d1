/**
 * The notebook page body: the column of cells with their tools, autosave, conflicts, comments and
 * the keyboard. Members edit according to their role; share-link visitors and viewers read only.
 */
import { useEffect, useLayoutEffect, useMemo, useRef, useState } from 'react';
import { useQueries, useQueryClient } from '@tanstack/react-query';
import { CELL_KIND_LABELS, dataContentSchema, type NbCell, type NbCellKind } from '@shared/api/notebook';
import { dataSchemaOf, type DataSchema, type SchemaSourceTable } from '@shared/lang';
import { errorMessage } from '@/lib/api-client';
import { CellColumn, NOTEBOOK_KEYS } from './cell-column';
import { CellFrame } from './cell-frame';
import { ConflictDialog } from './conflict-dialog';
import { CommentsPanel } from './comments-panel';
import { fitModelCell, QuantityLabelsContext, quantityLabels } from '../quantity-labels';
import type { CellViewProps } from './cell-view-props';
import { NotesCellView } from '../notes/notes-cell-view';
import { DataCellView } from '../data/data-cell-view';
import { ModelCellView } from '../model/model-cell-view';
import { FitCellView } from '../fit/fit-cell';
import { CompareCellView } from '../compare/compare-cell-view';
import { useCellDraft, type SaveState } from '../use-cell-draft';
import { useRunEvents } from '../api/use-run-events';
import type { NotebookAccess } from '../api/access';
import { datasetQuery } from '../api/get-dataset';
import { saveCell } from '../api/save-cell';
import { useCreateCell } from '../api/create-cell';
import { useDeleteCell } from '../api/delete-cell';
import { useMoveCell } from '../api/move-cell';
import { useCollapseCell } from '../api/collapse-cell';
import { useComments } from '../api/get-comments';
import { useCreateComment } from '../api/create-comment';
import { useResolveComment } from '../api/resolve-comment';
import { nbKeys } from '../api/keys';
import { preloadCharts } from './plot-frame';
import { buttonClass } from '@/components/ui/button';
import { nextQuietMoment } from '@/lib/quiet-moment';

export interface NotebookViewProps {
  access: NotebookAccess;
  cells: NbCell[];
  canEdit: boolean;
  canComment: boolean;
}

const STATE_WORDS: Record<SaveState, string> = {
  saved: 'saved',
  unsaved: 'editing…',
  saving: 'saving…',
  error: 'not saved',
  conflict: 'conflict',
};

export function NotebookView({ access, cells: rawCells, canEdit, canComment }: NotebookViewProps) {
  const cells = useMemo(() => [...rawCells].sort((a, b) => a.position - b.position), [rawCells]);
  const hasFitCell = cells.some((c) => c.kind === 'fit');
  useEffect(() => {
    // Fetch the charting code alongside the runs' draws rather than after them.
    if (hasFitCell) void preloadCharts().catch(() => undefined);
  }, [hasFitCell]);
  // While the notebook opens, cells far from the viewport skip style, layout and paint
  // (data-opening, app.css): the first screen is drawn with the work of the cells in view. At the
  // page's first quiet moment every cell is rendered as usual (set on the element, not as state,
  // so the cells do not render again).
  const root = useRef<HTMLDivElement>(null);
  useEffect(() => {
    let live = true;
    void nextQuietMoment().then(() => {
      if (live) root.current?.removeAttribute('data-opening');
    });
    return () => {
      live = false;
    };
  }, []);
  const [activeId, setActiveId] = useState<string | null>(cells[0]?.id ?? null);
  const [runSignals, setRunSignals] = useState<Record<string, number>>({});
  const [editingNotes, setEditingNotes] = useState<Record<string, boolean>>({});
  const [openComments, setOpenComments] = useState<Record<string, boolean>>({});
  const [actionError, setActionError] = useState<string | null>(null);
  const member = access.mode === 'member';
  const wsId = member ? access.workspaceId : '';
  useRunEvents(access);
  const mut = {
    add: useCreateCell(wsId, access.notebookId),
    remove: useDeleteCell(wsId, access.notebookId),
    move: useMoveCell(wsId, access.notebookId),
    collapse: useCollapseCell(wsId, access.notebookId),
  };
  // Every member reads the comments; reviewers and above write them.
  const comments = useComments(wsId, access.notebookId, member);
  const commentMut = { create: useCreateComment(wsId, access.notebookId), resolve: useResolveComment(wsId, access.notebookId) };

  // Tables bound by the data cells, for the model editor's completion and checks.
  const dataIds = cells
    .filter((c) => c.kind === 'data')
    .map((c) => {
      const p = dataContentSchema.safeParse(c.content);
      return p.success ? p.data.datasetId : null;
    })
    .filter((x): x is string => !!x);
  const datasets = useQueries({ queries: dataIds.map((id) => datasetQuery(access, id)) });
  // Rebuilt only when a table's answer changes: every model editor reconfigures itself when the
  // schema object changes, and the fit cells key their labels on it.
  const datasetsKey = datasets.map((q) => `${q.data?.dataset.id ?? ''}@${q.dataUpdatedAt}`).join('|');
  const { schema, levels } = useMemo(() => {
    const tables: Record<string, SchemaSourceTable> = {};
    // Level names of category columns, for labelling the elements of unknowns they gather.
    const levels: Record<string, Record<string, readonly string[]>> = {};
    for (const q of datasets) {
      if (!q.data) continue;
      const d = q.data.dataset;
      levels[d.name] = Object.fromEntries(d.columns.filter((c) => c.levels).map((c) => [c.name, c.levels!]));
      tables[d.name] = { rows: d.rows, columns: Object.fromEntries(d.columns.map((c) => [c.name, c])) };
    }
    return { schema: dataSchemaOf(tables), levels };
  }, [datasetsKey]); // eslint-disable-line react-hooks/exhaustive-deps

  const add = (kind: NbCellKind, position: number) => {
    setActionError(null);
    mut.add.mutate(
      { kind, position },
      {
        onSuccess: (res) => {
          setActiveId(res.cell.id);
          if (kind === 'notes') setEditingNotes((e) => ({ ...e, [res.cell.id]: true }));
        },
        onError: (e) => setActionError(errorMessage(e)),
      },
    );
  };

  /**
   * Closing a notes editor removes the focused text area; the focus would fall to the page body,
   * outside the column that listens for Alt-↑/↓. Hand it to the cell itself instead.
   */
  const refocus = useRef<string | null>(null);
  const closeNotes = (id: string) => {
    refocus.current = id;
    setEditingNotes((e) => ({ ...e, [id]: false }));
  };
  // Right after the commit that removed the text area (before the next key can arrive).
  useLayoutEffect(() => {
    const id = refocus.current;
    if (!id) return;
    refocus.current = null;
    const el = document.querySelector<HTMLElement>(`[data-cell-id="${CSS.escape(id)}"]`);
    if (el && !el.contains(document.activeElement)) el.focus({ preventScroll: true });
  }, [editingNotes]);

  const run = (id: string) => {
    const cell = cells.find((c) => c.id === id);
    if (!cell) return;
    if (cell.kind === 'notes') return closeNotes(id);
    let target = cell;
    if (cell.kind === 'model') {
      // Running a model runs the first fit cell below it that fits it.
      const fit = cells.find((c) => c.kind === 'fit' && c.position > cell.position && (c.content as { modelCellId?: string | null } | null)?.modelCellId === cell.id);
      if (!fit) return;
      target = fit;
    }
    if (target.kind === 'fit') setRunSignals((s) => ({ ...s, [target.id]: (s[target.id] ?? 0) + 1 }));
  };

  const commentList = comments.data?.comments ?? [];
  const openCounts = useMemo(() => {
    const m: Record<string, number> = {};
    for (const c of commentList) if (!c.replyTo && !c.resolved) m[c.cellId] = (m[c.cellId] ?? 0) + 1;
    return m;
  }, [commentList]);

  return (
    <div ref={root} data-opening="" className="text-ink flex flex-col gap-3">
      {member && <NotebookToolbar access={access} />}
      {!canEdit && member && (
        <div className="rounded-[3px] border border-rule-strong bg-sheet px-[0.9rem] py-[0.55rem] text-[0.85rem]" role="status" data-testid="read-only-banner">
          <strong>Read-only.</strong> Your role in this workspace lets you read{canComment ? ' and comment on' : ''} this notebook, not change it.
        </div>
      )}
      {actionError && (
        <p className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink" role="alert">
          {actionError}
        </p>
      )}
      <CellColumn
        cells={cells}
        activeId={activeId}
        onActivate={setActiveId}
        onAdd={canEdit ? add : undefined}
        onRun={run}
        renderCell={(cell, i) => (
          <CellItem
            key={cell.id}
            cell={cell}
            index={i}
            count={cells.length}
            cells={cells}
            access={access}
            canEdit={canEdit}
            active={activeId === cell.id}
            onActivate={() => setActiveId(cell.id)}
            schema={schema}
            levels={levels}
            runSignal={runSignals[cell.id] ?? 0}
            editingNotes={!!editingNotes[cell.id]}
            setEditingNotes={(v) => (v ? setEditingNotes((e) => ({ ...e, [cell.id]: true })) : closeNotes(cell.id))}
            onRun={() => run(cell.id)}
            onMove={(direction) => mut.move.mutate({ cellId: cell.id, direction }, { onError: (e) => setActionError(errorMessage(e)) })}
            onDelete={() => mut.remove.mutate(cell.id, { onError: (e) => setActionError(errorMessage(e)) })}
            onCollapse={(collapsed) => mut.collapse.mutate({ cellId: cell.id, collapsed }, { onError: (e) => setActionError(errorMessage(e)) })}
            commentsOpen={!!openComments[cell.id]}
            toggleComments={member ? () => setOpenComments((o) => ({ ...o, [cell.id]: !o[cell.id] })) : undefined}
            openCommentCount={member ? (openCounts[cell.id] ?? 0) : undefined}
            comments={
              openComments[cell.id] ? (
                <CommentsPanel
                  comments={commentList.filter((c) => c.cellId === cell.id)}
                  canComment={canComment}
                  busy={commentMut.create.isPending || commentMut.resolve.isPending}
                  error={commentMut.create.error ? errorMessage(commentMut.create.error) : commentMut.resolve.error ? errorMessage(commentMut.resolve.error) : null}
                  onCreate={(body, replyTo) => commentMut.create.mutate({ cellId: cell.id, body, replyTo })}
                  onResolve={(commentId, resolved) => commentMut.resolve.mutate({ commentId, resolved })}
                />
              ) : null
            }
          />
        )}
      />
      <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" style={{ textAlign: 'center', marginTop: '1rem' }}>
        Keyboard: {NOTEBOOK_KEYS.run.replace('Mod', 'Ctrl/⌘')} runs the current cell · {NOTEBOOK_KEYS.previous} and {NOTEBOOK_KEYS.next} move between cells
      </p>
    </div>
  );
}

interface CellItemProps {
  cell: NbCell;
  index: number;
  count: number;
  cells: NbCell[];
  access: NotebookAccess;
  canEdit: boolean;
  active: boolean;
  onActivate: () => void;
  schema: DataSchema;
  levels: Record<string, Record<string, readonly string[]>>;
  runSignal: number;
  editingNotes: boolean;
  setEditingNotes: (v: boolean) => void;
  /** Run this cell (Mod-Enter inside an editor that handles the key itself). */
  onRun: () => void;
  onMove: (d: 'up' | 'down') => void;
  onDelete: () => void;
  onCollapse: (collapsed: boolean) => void;
  commentsOpen: boolean;
  toggleComments?: () => void;
  openCommentCount?: number;
  comments: React.ReactNode;
}

/** A fit cell whose results label the elements of unknowns gathered by a category column with level names. */
function FitCellWithLabels({ viewProps, levels }: { viewProps: CellViewProps; levels: Record<string, Record<string, readonly string[]>> }) {
  const model = fitModelCell(viewProps.cell, viewProps.cells, viewProps.content);
  const source = model?.source ?? '';
  // schema and levels are rebuilt on every render of the notebook: key the check on their contents.
  const key = JSON.stringify([source, viewProps.schema, levels]);
  const label = useMemo(() => quantityLabels(source, viewProps.schema, levels), [key]); // eslint-disable-line react-hooks/exhaustive-deps
  return (
    <QuantityLabelsContext.Provider value={label}>
      <FitCellView {...viewProps} />
    </QuantityLabelsContext.Provider>
  );
}

function CellItem(p: CellItemProps) {
  const { cell, access } = p;
  const qc = useQueryClient();
  const readOnly = !p.canEdit;
  const draft = useCellDraft(
    cell,
    (body) => {
      if (access.mode !== 'member') throw new Error('read-only');
      return saveCell(access.workspaceId, access.notebookId, cell.id, body);
    },
    {
      readOnly,
      onSaved: (saved) => {
        if (access.mode !== 'member') return;
        qc.setQueryData(nbKeys.notebook(access.workspaceId, access.notebookId), (old: { cells: NbCell[] } | undefined) =>
          old ? { ...old, cells: old.cells.map((c) => (c.id === saved.id ? { ...c, ...saved } : c)) } : old,
        );
      },
    },
  );
  const [confirmDelete, setConfirmDelete] = useState(false);
  const viewProps: CellViewProps = {
    cell,
    access,
    readOnly,
    source: draft.source,
    content: draft.content,
    setSource: draft.setSource,
    setContent: draft.setContent,
    cells: p.cells,
    schema: p.schema,
    runSignal: p.runSignal,
    editingNotes: p.editingNotes,
    setEditingNotes: p.setEditingNotes,
    onRun: () => {
      // Save what was typed first: the fit reads the model as stored.
      void draft.flush().then(p.onRun, p.onRun);
    },
  };
  const label = CELL_KIND_LABELS[cell.kind];
  const subtitle = cell.kind === 'model' ? (cell.source.match(/^\s*#\s*(.+)$/m)?.[1] ?? undefined) : undefined;
  const conflictText = (c: unknown) => JSON.stringify(c, null, 2);
  const isText = cell.kind === 'notes' || cell.kind === 'model';

  return (
    <>
      <CellFrame
        id={cell.id}
        kind={cell.kind}
        subtitle={subtitle}
        collapsed={cell.collapsed}
        active={p.active}
        onFocusCell={p.onActivate}
        openComments={p.openCommentCount}
        onToggleCollapse={p.canEdit ? () => p.onCollapse(!cell.collapsed) : undefined}
        status={p.canEdit ? <span data-testid="save-state" data-state={draft.state} title={draft.error ?? undefined}>{STATE_WORDS[draft.state]} · v{draft.version}</span> : undefined}
        tools={
          <>
            {cell.kind === 'notes' && p.canEdit && (
              <button type="button" className={buttonClass('quiet', 'xs')} onClick={() => p.setEditingNotes(!p.editingNotes)}>
                {p.editingNotes ? 'done' : 'edit'}
              </button>
            )}
            {p.toggleComments && (
              <button type="button" className={buttonClass('quiet', 'xs')} aria-pressed={p.commentsOpen} onClick={p.toggleComments} aria-label={`Comments on this ${label.toLowerCase()} cell`}>
                comments
              </button>
            )}
            {p.canEdit && (
              <>
                <button type="button" className={buttonClass('quiet', 'xs')} disabled={p.index === 0} onClick={() => p.onMove('up')} aria-label={`Move ${label.toLowerCase()} cell up`}>
                  ↑
                </button>
                <button type="button" className={buttonClass('quiet', 'xs')} disabled={p.index === p.count - 1} onClick={() => p.onMove('down')} aria-label={`Move ${label.toLowerCase()} cell down`}>
                  ↓
                </button>
                {confirmDelete ? (
                  <>
                    <button type="button" className={buttonClass('secondary', 'xs')} onClick={p.onDelete}>
                      delete for good
                    </button>
                    <button type="button" className={buttonClass('quiet', 'xs')} onClick={() => setConfirmDelete(false)}>
                      keep
                    </button>
                  </>
                ) : (
                  <button type="button" className={buttonClass('quiet', 'xs')} onClick={() => setConfirmDelete(true)} aria-label={`Delete ${label.toLowerCase()} cell`}>
                    delete
                  </button>
                )}
              </>
            )}
          </>
        }
      >
        {cell.kind === 'notes' && <NotesCellView {...viewProps} />}
        {cell.kind === 'data' && <DataCellView {...viewProps} />}
        {cell.kind === 'model' && <ModelCellView {...viewProps} />}
        {cell.kind === 'fit' && <FitCellWithLabels viewProps={viewProps} levels={p.levels} />}
        {cell.kind === 'compare' && <CompareCellView {...viewProps} />}
        {draft.state === 'error' && draft.error && (
          <p className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink" role="alert" style={{ marginTop: '0.5rem' }}>
            Not saved: {draft.error}{' '}
            <button type="button" className={buttonClass('secondary', 'xs')} onClick={() => void draft.flush()}>
              try again
            </button>
          </p>
        )}
      </CellFrame>
      {p.comments && <div style={{ margin: '0.5rem 0 0 1.5rem' }}>{p.comments}</div>}
      {draft.conflict && (
        <ConflictDialog
          kindLabel={label}
          theirs={isText ? draft.conflict.current.source : conflictText(draft.conflict.current.content)}
          theirVersion={draft.conflict.current.version}
          mine={isText ? draft.conflict.mine.source : conflictText(draft.conflict.mine.content)}
          onKeepMine={() => void draft.keepMine()}
          onTakeTheirs={draft.takeTheirs}
        />
      )}
    </>
  );
}

function NotebookToolbar({ access }: { access: Extract<NotebookAccess, { mode: 'member' }> }) {
  // Importing a notebook file creates a new notebook: it lives on the notebook list.
  return (
    <div className="flex flex-wrap items-center gap-2">
      <a className={buttonClass('secondary', 'xs')} href={`/api/workspaces/${encodeURIComponent(access.workspaceId)}/notebooks/${encodeURIComponent(access.notebookId)}/export`} download>
        Export notebook file
      </a>
    </div>
  );
}
