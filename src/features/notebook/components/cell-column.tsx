import { useCallback, useEffect, useRef, type KeyboardEvent, type ReactNode } from 'react';
import { CELL_KIND_LABELS, NB_CELL_KINDS, type NbCellKind } from '@shared/api/notebook';
import { buttonClass } from '@/components/ui/button';

/**
 * Keyboard of the notebook (documented in the README's user guide):
 * - Mod-Enter (Ctrl-Enter, or ⌘-Enter on a Mac): run the current cell — a fit cell starts its fit,
 *   a model cell re-checks its program, a notes cell leaves editing.
 * - Alt-ArrowUp / Alt-ArrowDown: move to the previous / next cell.
 * Alt-arrows are taken before any editor inside the cell sees them (the capture phase), so moving
 * between cells works from anywhere, the model editor included. Mod-Enter inside the model editor
 * is handled by the editor itself (it runs the cell too); the column then leaves it alone.
 */
export const NOTEBOOK_KEYS = {
  run: 'Mod-Enter',
  previous: 'Alt-ArrowUp',
  next: 'Alt-ArrowDown',
} as const;

export function isRunKey(e: Pick<KeyboardEvent, 'key' | 'ctrlKey' | 'metaKey' | 'altKey' | 'shiftKey'>): boolean {
  return e.key === 'Enter' && (e.ctrlKey || e.metaKey) && !e.altKey && !e.shiftKey;
}

export function moveKey(e: Pick<KeyboardEvent, 'key' | 'ctrlKey' | 'metaKey' | 'altKey' | 'shiftKey'>): -1 | 1 | 0 {
  if (!e.altKey || e.ctrlKey || e.metaKey || e.shiftKey) return 0;
  if (e.key === 'ArrowUp') return -1;
  if (e.key === 'ArrowDown') return 1;
  return 0;
}

export interface CellColumnProps<C extends { id: string }> {
  cells: C[];
  activeId: string | null;
  onActivate: (id: string) => void;
  renderCell: (cell: C, index: number) => ReactNode;
  /** Add a cell of this kind at this 0-based position; omit for read-only notebooks. */
  onAdd?: (kind: NbCellKind, position: number) => void;
  onRun?: (id: string) => void;
}

/** The column of cells with the "add" line between them and the notebook's keyboard. */
export function CellColumn<C extends { id: string }>({ cells, activeId, onActivate, renderCell, onAdd, onRun }: CellColumnProps<C>) {
  const ref = useRef<HTMLDivElement>(null);

  const focusCell = useCallback((id: string) => {
    const el = ref.current?.querySelector<HTMLElement>(`[data-cell-id="${CSS.escape(id)}"]`);
    el?.focus({ preventScroll: false });
    el?.scrollIntoView?.({ block: 'nearest' });
  }, []);

  const onKeyDown = (e: KeyboardEvent<HTMLDivElement>) => {
    const current = activeId ?? cells[0]?.id ?? null;
    if (current === null || e.defaultPrevented) return;
    if (isRunKey(e) && onRun) {
      e.preventDefault();
      onRun(current);
    }
  };

  const onKeyDownCapture = (e: KeyboardEvent<HTMLDivElement>) => {
    const current = activeId ?? cells[0]?.id ?? null;
    if (current === null) return;
    const step = moveKey(e);
    if (step !== 0) {
      const idx = cells.findIndex((c) => c.id === current);
      const next = cells[Math.min(cells.length - 1, Math.max(0, idx + step))];
      if (next && next.id !== current) {
        e.preventDefault();
        e.stopPropagation();
        onActivate(next.id);
        focusCell(next.id);
      }
    }
  };

  // Bring a newly added cell into view once it is on the page. (Clicking inside a cell only marks
  // it active: scrolling then would move the button away from under the pointer.)
  const known = useRef(new Set(cells.map((c) => c.id)));
  useEffect(() => {
    const ids = new Set(cells.map((c) => c.id));
    if (activeId && ids.has(activeId) && !known.current.has(activeId)) {
      const el = ref.current?.querySelector<HTMLElement>(`[data-cell-id="${CSS.escape(activeId)}"]`);
      el?.scrollIntoView?.({ block: 'nearest' });
    }
    known.current = ids;
  }, [activeId, cells]);

  return (
    <div ref={ref} className="flex flex-col" onKeyDown={onKeyDown} onKeyDownCapture={onKeyDownCapture} data-testid="cell-column">
      {onAdd && <AddLine position={0} onAdd={onAdd} always={cells.length === 0} />}
      {cells.map((cell, i) => (
        <div key={cell.id}>
          {renderCell(cell, i)}
          {onAdd && <AddLine position={i + 1} onAdd={onAdd} always={false} />}
        </div>
      ))}
      {cells.length === 0 && (
        <p className="truncate text-[0.8rem] text-ink-soft py-8 text-center">
          <span>This notebook has no cells yet</span>.
          {onAdd && <span> Add notes, data, a model and a fit with the line above.</span>}
        </p>
      )}
    </div>
  );
}

function AddLine({ position, onAdd, always }: { position: number; onAdd: (kind: NbCellKind, position: number) => void; always: boolean }) {
  return (
    <div className="group/gap relative flex h-[1.6rem] items-center justify-center before:absolute before:top-1/2 before:right-[8%] before:left-[8%] before:border-t before:border-dashed before:border-transparent before:content-[''] hover:before:border-slack focus-within:before:border-slack" data-always={always} role="group" aria-label={`Add a cell at position ${position + 1}`}>
      <div className="relative flex gap-1 bg-paper px-2 opacity-0 group-hover/gap:opacity-100 group-focus-within/gap:opacity-100 group-data-[always=true]/gap:opacity-100">
        <span className="truncate text-[0.8rem] text-ink-soft" aria-hidden>
          add
        </span>
        {NB_CELL_KINDS.map((k) => (
          <button key={k} type="button" className={buttonClass('quiet', 'xs')} onClick={() => onAdd(k, position)} aria-label={`Add ${CELL_KIND_LABELS[k].toLowerCase()} cell here`}>
            {CELL_KIND_LABELS[k].toLowerCase()}
          </button>
        ))}
      </div>
    </div>
  );
}
