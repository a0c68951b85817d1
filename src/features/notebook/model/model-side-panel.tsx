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
      <aside className="truncate text-[0.8rem] text-ink-soft" aria-label="Model check">
        {checking ? 'Checking the model…' : readOnly ? 'This model cell is empty.' : 'Write a model to see its unknowns and constraints.'}
      </aside>
    );
  const errors = check.messages.filter((m) => m.severity === 'error');
  const dims = check.unknowns.reduce((s, u) => s + u.shape.reduce((p, d) => p * d, 1), 0);
  const region = check.region;
  return (
    <aside className="flex flex-col gap-3 text-sm" aria-label="Model check" data-testid="model-side-panel" data-read-only={readOnly || undefined}>
      {readOnly && <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" style={{ marginTop: 0 }}>Read-only: the program as saved, checked against the notebook's tables.</p>}
      <div>
        <div className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">Unknowns</div>
        {check.unknowns.length === 0 ? (
          <p className="truncate text-[0.8rem] text-ink-soft">none yet</p>
        ) : (
          <ul>
            {check.unknowns.map((u) => (
              <li key={u.name} className="flex justify-between gap-2">
                <span className="font-mono tabular-nums">{u.name}</span>
                <span className="font-mono tabular-nums text-right whitespace-nowrap" style={{ color: 'var(--color-ink-soft)' }}>{u.shape.length ? `[${u.shape.join(' × ')}]` : 'scalar'}</span>
              </li>
            ))}
          </ul>
        )}
        {check.unknowns.length > 0 && <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">{dims} coordinate{dims === 1 ? '' : 's'} in all</p>}
      </div>
      {check.derived.length > 0 && (
        <div>
          <div className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">Derived</div>
          <p className="font-mono tabular-nums">{check.derived.join(', ')}</p>
        </div>
      )}
      <div>
        <div className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">Constraints</div>
        <p>
          <span className="font-mono tabular-nums text-right whitespace-nowrap">{check.constraints.inequalities}</span> inequalit{check.constraints.inequalities === 1 ? 'y' : 'ies'} ·{' '}
          <span className="font-mono tabular-nums text-right whitespace-nowrap">{check.constraints.equalities}</span> equalit{check.constraints.equalities === 1 ? 'y' : 'ies'}
        </p>
      </div>
      {check.tables.length > 0 && (
        <div>
          <div className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">Tables</div>
          <p className="font-mono tabular-nums">{check.tables.join(', ')}</p>
        </div>
      )}
      <div>
        <div className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">Region</div>
        <p data-testid="region-status">
          <span className="inline-flex items-center gap-1 rounded-full border border-rule-strong px-[0.45rem] py-[0.1rem] text-[0.72rem] text-ink-soft data-[tone=accent]:border-slack data-[tone=accent]:text-slack data-[tone=warning]:border-alarm data-[tone=warning]:font-semibold data-[tone=warning]:text-alarm" data-tone={region.status === 'interior' ? 'accent' : region.status === 'unchecked' ? undefined : 'warning'}>
            {REGION_WORDS[region.status]}
          </span>
        </p>
        {region.message && (
          <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft" data-testid="region-message">
            <MessageText text={region.message} />
          </p>
        )}
      </div>
      {errors.length > 0 && (
        <div>
          <div className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack">Problems</div>
          <ul>
            {errors.slice(0, 8).map((m, i) => (
              <li key={i}>
                <span className="font-mono tabular-nums text-right whitespace-nowrap" style={{ color: 'var(--color-ink-soft)' }}>{m.line}:{m.column}</span> <MessageText text={m.message} />
              </li>
            ))}
          </ul>
          {errors.length > 8 && <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">and {errors.length - 8} more (marked in the editor)</p>}
        </div>
      )}
      {checking && <p className="mt-[0.2rem] text-[0.72rem] text-ink-soft">re-checking…</p>}
    </aside>
  );
}
