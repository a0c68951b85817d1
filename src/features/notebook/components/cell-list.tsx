import type { Cell, CellKind } from '@shared/api';
import { EmptyState } from '@/components/ui/empty-state';
import { Markdown } from '@/components/markdown';
import { formatDateTime } from '@/lib/format';

/** Cells are labelled by their kind in words, never by a running number. */
export const CELL_KIND_LABEL: Record<CellKind, string> = {
  notes: 'Notes',
  data: 'Data',
  model: 'Model',
  fit: 'Fit',
  compare: 'Comparison',
};

function SourceBlock({ source }: { source: string }) {
  const lines = source.replace(/\n$/, '').split('\n');
  return (
    <pre className="num overflow-x-auto rounded-md bg-sheet-dim/70 py-3 text-[0.8125rem] leading-6 text-ink">
      <code className="grid grid-cols-[auto_1fr]">
        {lines.map((line, i) => (
          <span key={i} className="contents">
            <span aria-hidden="true" className="pr-4 pl-3 text-right text-ink-faint/70 select-none">
              {i + 1}
            </span>
            <span className="pr-4 whitespace-pre">{line || ' '}</span>
          </span>
        ))}
      </code>
    </pre>
  );
}

function CellBody({ cell }: { cell: Cell }) {
  const hasSource = cell.source.trim().length > 0;
  const hasContent = cell.content !== null && cell.content !== undefined;
  if (!hasSource && !hasContent) return <p className="text-sm text-ink-faint italic">This cell is empty.</p>;
  return (
    <div className="flex flex-col gap-3">
      {hasSource && (cell.kind === 'notes' ? <Markdown source={cell.source} /> : <SourceBlock source={cell.source} />)}
      {hasContent && (
        <details className="text-sm">
          <summary className="cursor-pointer text-ink-soft select-none hover:text-ink">Cell settings</summary>
          <pre className="num mt-2 overflow-x-auto rounded-md bg-sheet-dim/70 p-3 text-xs leading-5">
            {JSON.stringify(cell.content, null, 2)}
          </pre>
        </details>
      )}
    </div>
  );
}

/** The cells of a notebook, read-only, in their stored order. */
export function CellList({ cells, emptyHint }: { cells: Cell[]; emptyHint?: string }) {
  if (cells.length === 0) {
    return (
      <EmptyState title="This notebook has no cells yet">
        {emptyHint ?? 'Cells will appear here in order: notes, data, a model, its fits and comparisons.'}
      </EmptyState>
    );
  }
  const ordered = [...cells].sort((a, b) => a.position - b.position);
  return (
    <ol className="flex flex-col gap-4" aria-label="Cells">
      {ordered.map((cell) => (
        <li key={cell.id} className="sheet grid gap-x-6 gap-y-3 p-5 md:grid-cols-[7rem_minmax(0,1fr)]">
          <div className="flex flex-row items-baseline gap-3 md:flex-col md:gap-1">
            <span className="eyebrow text-ink-soft">{CELL_KIND_LABEL[cell.kind]}</span>
            <span className="num text-[0.6875rem] text-ink-faint" title={`Saved ${formatDateTime(cell.updatedAt)}`}>
              v{cell.version}
            </span>
          </div>
          <CellBody cell={cell} />
        </li>
      ))}
    </ol>
  );
}
