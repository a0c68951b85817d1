import type { CompileResponse } from '@shared/api/notebook';
import { MessageText } from '@/components/message-text';

const REGION_WORDS: Record<CompileResponse['region']['status'], string> = {
  interior: 'interior found',
  empty: 'empty region',
  flat: 'no interior',
  unchecked: 'not checked',
};

/** Beside the model editor: unknowns and their shapes, constraint counts, the region check. */
export function ModelSidePanel({ check, checking, readOnly = false }: { check: CompileResponse | null; checking: boolean; readOnly?: boolean }) {
  if (!check)
    return (
      <aside className="sl-cell-sub" aria-label="Model check">
        {checking ? 'Checking the model…' : readOnly ? 'This model cell is empty.' : 'Write a model to see its unknowns and constraints.'}
      </aside>
    );
  const errors = check.messages.filter((m) => m.severity === 'error');
  const dims = check.unknowns.reduce((s, u) => s + u.shape.reduce((p, d) => p * d, 1), 0);
  const region = check.region;
  return (
    <aside className="flex flex-col gap-3 text-sm" aria-label="Model check" data-testid="model-side-panel" data-read-only={readOnly || undefined}>
      {readOnly && <p className="sl-hint" style={{ marginTop: 0 }}>Read-only: the program as saved, checked against the notebook's tables.</p>}
      <div>
        <div className="sl-kind">Unknowns</div>
        {check.unknowns.length === 0 ? (
          <p className="sl-cell-sub">none yet</p>
        ) : (
          <ul>
            {check.unknowns.map((u) => (
              <li key={u.name} className="flex justify-between gap-2">
                <span className="sl-mono">{u.name}</span>
                <span className="sl-num" style={{ color: 'var(--sl-ink-soft)' }}>{u.shape.length ? `[${u.shape.join(' × ')}]` : 'scalar'}</span>
              </li>
            ))}
          </ul>
        )}
        {check.unknowns.length > 0 && <p className="sl-hint">{dims} coordinate{dims === 1 ? '' : 's'} in all</p>}
      </div>
      {check.derived.length > 0 && (
        <div>
          <div className="sl-kind">Derived</div>
          <p className="sl-mono">{check.derived.join(', ')}</p>
        </div>
      )}
      <div>
        <div className="sl-kind">Constraints</div>
        <p>
          <span className="sl-num">{check.constraints.inequalities}</span> inequalit{check.constraints.inequalities === 1 ? 'y' : 'ies'} ·{' '}
          <span className="sl-num">{check.constraints.equalities}</span> equalit{check.constraints.equalities === 1 ? 'y' : 'ies'}
        </p>
      </div>
      {check.tables.length > 0 && (
        <div>
          <div className="sl-kind">Tables</div>
          <p className="sl-mono">{check.tables.join(', ')}</p>
        </div>
      )}
      <div>
        <div className="sl-kind">Region</div>
        <p data-testid="region-status">
          <span className="sl-chip" data-tone={region.status === 'interior' ? 'accent' : region.status === 'unchecked' ? undefined : 'warning'}>
            {REGION_WORDS[region.status]}
          </span>
        </p>
        {region.message && (
          <p className="sl-hint" data-testid="region-message">
            <MessageText text={region.message} />
          </p>
        )}
      </div>
      {errors.length > 0 && (
        <div>
          <div className="sl-kind">Problems</div>
          <ul>
            {errors.slice(0, 8).map((m, i) => (
              <li key={i}>
                <span className="sl-num" style={{ color: 'var(--sl-ink-soft)' }}>{m.line}:{m.column}</span> <MessageText text={m.message} />
              </li>
            ))}
          </ul>
          {errors.length > 8 && <p className="sl-hint">and {errors.length - 8} more (marked in the editor)</p>}
        </div>
      )}
      {checking && <p className="sl-hint">re-checking…</p>}
    </aside>
  );
}
