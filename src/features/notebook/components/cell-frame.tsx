import type { ReactNode } from 'react';
import { CELL_KIND_LABELS, type NbCellKind } from '@shared/api/notebook';
import { buttonClass } from '@/components/ui/button';

export interface CellFrameProps {
  id: string;
  kind: NbCellKind;
  /** A short description next to the kind: the table a data cell shows, the model a fit uses. */
  subtitle?: string;
  collapsed: boolean;
  active: boolean;
  /** Open comment threads on this cell (shown when defined). */
  openComments?: number;
  /** Save state shown in the head: "saved v4", "saving…", "unsaved". */
  status?: ReactNode;
  tools?: ReactNode;
  onToggleCollapse?: () => void;
  onFocusCell?: () => void;
  children: ReactNode;
}

/**
 * One cell: a sheet whose head names its kind in words (never a number), with its tools on the
 * right. The sheet itself is focusable so the keyboard can move between cells.
 */
export function CellFrame(props: CellFrameProps) {
  const { id, kind, subtitle, collapsed, active, openComments, status, tools, onToggleCollapse, onFocusCell, children } = props;
  const label = CELL_KIND_LABELS[kind];
  return (
    <section
      className="group/cell relative rounded-[3px] border border-rule bg-sheet shadow-[0_1px_0_rgba(34,40,43,0.04)] transition-[box-shadow,border-color] duration-[120ms] data-[active=true]:border-rule-strong data-[active=true]:shadow-[0_6px_18px_-12px_rgba(34,40,43,0.35)] focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-slack"
      id={`cell-${id}`}
      data-cell-id={id}
      data-kind={kind}
      data-active={active}
      data-collapsed={collapsed}
      tabIndex={-1}
      aria-label={`${label} cell${subtitle ? `: ${subtitle}` : ''}`}
      onFocus={onFocusCell}
      onMouseDown={onFocusCell}
    >
      <header className="flex flex-wrap items-center gap-3 border-b border-rule px-[0.9rem] py-[0.45rem] group-data-[collapsed=true]/cell:border-b-0 max-[520px]:px-[0.6rem] max-[520px]:py-[0.4rem]">
        {onToggleCollapse && (
          <button
            type="button"
            className={buttonClass('quiet', 'xs')}
            style={{ padding: '0.2rem' }}
            aria-expanded={!collapsed}
            aria-label={collapsed ? `Expand ${label.toLowerCase()} cell` : `Collapse ${label.toLowerCase()} cell`}
            onClick={onToggleCollapse}
          >
            <span aria-hidden style={{ display: 'inline-block', width: '0.8rem', transform: collapsed ? 'rotate(-90deg)' : undefined, transition: 'transform 120ms' }}>
              ▾
            </span>
          </button>
        )}
        <span data-testid="cell-kind" className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">{label}</span>
        {subtitle && <span className="truncate text-[0.8rem] text-ink-soft">{subtitle}</span>}
        {openComments !== undefined && openComments > 0 && (
          <span className="inline-flex items-center gap-1 rounded-full border border-rule-strong px-[0.45rem] py-[0.1rem] text-[0.72rem] text-ink-soft data-[tone=accent]:border-slack data-[tone=accent]:text-slack data-[tone=warning]:border-alarm data-[tone=warning]:font-semibold data-[tone=warning]:text-alarm" title={`${openComments} open comment thread${openComments === 1 ? '' : 's'}`}>
            {openComments} open
          </span>
        )}
        <div className="ml-auto flex min-w-0 flex-wrap items-center justify-end gap-[0.15rem]">
          {status && <span className="truncate text-[0.8rem] text-ink-soft" style={{ marginRight: '0.5rem' }}>{status}</span>}
          {tools}
        </div>
      </header>
      {!collapsed && <div data-cell-body className="min-w-0 p-[0.9rem] max-[520px]:px-[0.6rem] max-[520px]:py-3 [&_select]:max-w-full [&_select]:min-w-0 [&_select]:flex-[0_1_auto] [&_select]:text-ellipsis [&_label]:max-w-full [&_label]:min-w-0 [&_label>span]:flex-none [&_figure]:max-w-full [&_figure]:overflow-x-auto">{children}</div>}
    </section>
  );
}
