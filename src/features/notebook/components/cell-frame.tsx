import type { ReactNode } from 'react';
import { CELL_KIND_LABELS, type NbCellKind } from '@shared/api/notebook';

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
      className="sl-cell"
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
      <header className="sl-cell-head">
        {onToggleCollapse && (
          <button
            type="button"
            className="sl-btn"
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
        <span className="sl-kind">{label}</span>
        {subtitle && <span className="sl-cell-sub">{subtitle}</span>}
        {openComments !== undefined && openComments > 0 && (
          <span className="sl-chip" title={`${openComments} open comment thread${openComments === 1 ? '' : 's'}`}>
            {openComments} open
          </span>
        )}
        <div className="sl-cell-tools">
          {status && <span className="sl-cell-sub" style={{ marginRight: '0.5rem' }}>{status}</span>}
          {tools}
        </div>
      </header>
      {!collapsed && <div className="sl-cell-body">{children}</div>}
    </section>
  );
}
