/**
 * What a comparison compares: model cells, the constraint lines tested per model (shown as written;
 * the checked lines of a model are tested together), the reference row, prior odds, replicates and
 * seed. Edits go to the cell's draft through `onChange`.
 */
import type { CompareContent, CompareEntryKey } from '@shared/api/compare';
import { sameEntry } from '@shared/api/compare';
import { compactControlClass } from '@/components/ui/input';
import { testableConstraintLines } from './constraint-lines';

export interface CompareModelOption {
  id: string;
  label: string;
  source: string;
}

/** The rows a content makes: each model as written, then each tested model without its lines. */
export function compareRows(content: CompareContent, models: CompareModelOption[]): { key: CompareEntryKey; label: string }[] {
  const label = (id: string) => models.find((m) => m.id === id)?.label ?? 'a deleted model';
  const rows = content.modelCellIds.map((id) => ({ key: { modelCellId: id, without: [] as number[] }, label: label(id) }));
  for (const h of content.hypotheses) {
    const lines = [...h.lines].sort((a, b) => a - b);
    rows.push({ key: { modelCellId: h.modelCellId, without: lines }, label: `${label(h.modelCellId)} without line${lines.length > 1 ? 's' : ''} ${lines.join(', ')}` });
  }
  return rows;
}

const keyValue = (k: CompareEntryKey) => `${k.modelCellId}|${k.without.join(',')}`;

export function CompareSettings({ content, models, readOnly, onChange }: { content: CompareContent; models: CompareModelOption[]; readOnly: boolean; onChange: (c: CompareContent) => void }) {
  const set = (patch: Partial<CompareContent>) => onChange({ ...content, ...patch });
  const toggleModel = (id: string) => {
    if (content.modelCellIds.includes(id)) {
      set({
        modelCellIds: content.modelCellIds.filter((x) => x !== id),
        hypotheses: content.hypotheses.filter((h) => h.modelCellId !== id),
        reference: content.reference?.modelCellId === id ? null : content.reference,
        priorOdds: content.priorOdds.filter((o) => o.key.modelCellId !== id),
      });
    } else set({ modelCellIds: [...content.modelCellIds, id] });
  };
  const toggleLine = (modelCellId: string, line: number) => {
    const h = content.hypotheses.find((x) => x.modelCellId === modelCellId);
    const lines = h ? (h.lines.includes(line) ? h.lines.filter((l) => l !== line) : [...h.lines, line].sort((a, b) => a - b)) : [line];
    const others = content.hypotheses.filter((x) => x.modelCellId !== modelCellId);
    const oldKey = h ? { modelCellId, without: h.lines } : null;
    set({
      hypotheses: lines.length ? [...others, { modelCellId, lines }] : others,
      reference: oldKey && content.reference && sameEntry(content.reference, oldKey) ? (lines.length ? { modelCellId, without: lines } : null) : content.reference,
      priorOdds: oldKey ? content.priorOdds.filter((o) => !sameEntry(o.key, oldKey)) : content.priorOdds,
    });
  };
  const rows = compareRows(content, models);
  const reference = content.reference ?? rows[0]?.key ?? null;
  const oddsOf = (k: CompareEntryKey) => content.priorOdds.find((o) => sameEntry(o.key, k))?.odds ?? 1;
  const setOdds = (k: CompareEntryKey, odds: number) => {
    const rest = content.priorOdds.filter((o) => !sameEntry(o.key, k));
    set({ priorOdds: odds === 1 || !(odds > 0) ? rest : [...rest, { key: k, odds }] });
  };

  return (
    <div className="flex flex-col gap-4 text-sm" data-testid="compare-settings">
      <fieldset className="flex min-w-0 flex-col gap-2">
        <legend className="eyebrow mb-1">Models to compare</legend>
        {models.length === 0 && <p className="text-ink-soft">This notebook has no model cells yet.</p>}
        {models.map((m) => {
          const picked = content.modelCellIds.includes(m.id);
          const lines = testableConstraintLines(m.source);
          const tested = content.hypotheses.find((h) => h.modelCellId === m.id)?.lines ?? [];
          return (
            <div key={m.id} className="flex flex-col gap-1.5">
              <label className="flex items-center gap-2 font-medium">
                <input type="checkbox" checked={picked} disabled={readOnly} onChange={() => toggleModel(m.id)} />
                <strong className="min-w-0 font-medium break-words">{m.label}</strong>
              </label>
              {picked && (
                <div className="ml-6 flex flex-col gap-1" role="group" aria-label={`Constraint lines of ${m.label} to test`}>
                  {lines.length === 0 ? (
                    <p className="text-ink-soft">No inequality constraint lines to test.</p>
                  ) : (
                    <>
                      <p className="text-ink-soft">Test constraint lines (checked lines are tested together against the model without them):</p>
                      {lines.map((l) => (
                        <label key={l.line} className="flex min-w-0 items-baseline gap-2">
                          <input type="checkbox" checked={tested.includes(l.line)} disabled={readOnly} onChange={() => toggleLine(m.id, l.line)} />
                          <span className="num text-ink-soft">line {l.line}</span>
                          <code className="min-w-0 font-mono text-[0.8125rem] break-words">{l.text}</code>
                        </label>
                      ))}
                    </>
                  )}
                </div>
              )}
            </div>
          );
        })}
      </fieldset>

      {rows.length > 0 && (
        <fieldset className="flex min-w-0 flex-col gap-2">
          <legend className="eyebrow mb-1">Reference and prior odds</legend>
          <label className="flex min-w-0 flex-col gap-1">
            <span>Bayes factors against</span>
            <select
              className={compactControlClass}
              style={{ width: '100%', maxWidth: '28rem', minWidth: 0, fontFamily: 'inherit' }}
              aria-label="Reference row"
              disabled={readOnly}
              value={reference ? keyValue(reference) : ''}
              onChange={(e) => set({ reference: rows.find((r) => keyValue(r.key) === e.target.value)?.key ?? null })}
            >
              {rows.map((r) => (
                <option key={keyValue(r.key)} value={keyValue(r.key)}>
                  {r.label}
                </option>
              ))}
            </select>
          </label>
          <div className="grid items-center gap-x-3 gap-y-1" style={{ gridTemplateColumns: 'minmax(0, 1fr) 7rem' }}>
            {rows.map((r) => (
              <label key={keyValue(r.key)} className="contents">
                <span className="truncate">Prior odds of {r.label}</span>
                <input
                  type="number"
                  className={compactControlClass}
                  min={0}
                  step="any"
                  disabled={readOnly}
                  value={oddsOf(r.key)}
                  onChange={(e) => setOdds(r.key, Number(e.target.value))}
                />
              </label>
            ))}
          </div>
          <p className="text-ink-soft">Odds are relative weights (1 each = every row equally likely before the data).</p>
        </fieldset>
      )}

      <div className="flex flex-wrap items-center gap-4">
        <label className="flex items-center gap-2">
          <span>Replicates</span>
          <input
            type="number"
            className={compactControlClass}
            style={{ width: '5rem' }}
            min={2}
            max={16}
            disabled={readOnly}
            value={content.replicates}
            onChange={(e) => {
              const v = Math.round(Number(e.target.value));
              if (v >= 2 && v <= 16) set({ replicates: v });
            }}
          />
        </label>
        <label className="flex items-center gap-2">
          <span>Seed</span>
          <input
            type="number"
            className={compactControlClass}
            style={{ width: '8rem' }}
            min={0}
            disabled={readOnly}
            value={content.seed}
            onChange={(e) => {
              const v = Math.round(Number(e.target.value));
              if (v >= 0 && v <= 2_147_483_647) set({ seed: v });
            }}
          />
        </label>
      </div>
    </div>
  );
}
