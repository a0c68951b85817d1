/**
 * The compare cell: which model cells it compares, and their evidence once the engine computes it.
 * Evidence (log Z) and Bayes factors are not computed by this build, so the cell says so plainly
 * and shows no numbers.
 */
export interface CompareCellProps {
  models: { id: string; label: string }[];
  selected: string[];
  readOnly: boolean;
  onChange: (ids: string[]) => void;
}

export function CompareCell({ models, selected, readOnly, onChange }: CompareCellProps) {
  const toggle = (id: string) => onChange(selected.includes(id) ? selected.filter((x) => x !== id) : [...selected, id]);
  return (
    <div className="flex flex-col gap-3 text-sm" data-testid="compare-cell">
      <fieldset>
        <legend className="truncate text-[0.8rem] text-ink-soft" style={{ marginBottom: '0.3rem' }}>Models to compare</legend>
        {models.length === 0 && <p className="truncate text-[0.8rem] text-ink-soft">This notebook has no model cells yet.</p>}
        <div className="flex flex-wrap gap-3">
          {models.map((m) => (
            <label key={m.id} className="flex items-center gap-1.5">
              <input type="checkbox" checked={selected.includes(m.id)} disabled={readOnly} onChange={() => toggle(m.id)} />
              <span>{m.label}</span>
            </label>
          ))}
        </div>
      </fieldset>
      <div className="rounded-[3px] border border-rule-strong bg-sheet px-[0.9rem] py-[0.55rem] text-[0.85rem]" role="status">
        <strong>Evidence not available yet.</strong> Slackline will estimate each model’s evidence (log Z, by annealing
        from the constraint region’s volume to the posterior) and the Bayes factors between them. This build does not
        compute evidence, so no numbers are shown here.
      </div>
    </div>
  );
}
