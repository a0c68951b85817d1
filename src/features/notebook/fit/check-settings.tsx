import { useId } from 'react';
import { CHECK_LIMITS, describeStat } from '@shared/checks';
import { Field } from '@/components/ui/field';
import { compactControlClass } from '@/components/ui/input';
import type { FitSettings } from '@shared/fit';

/** The user's own statistic, chosen from a short list (a name, never an expression). */
const STAT_KINDS = [
  { kind: '', words: 'none' },
  { kind: 'median', words: 'median' },
  { kind: 'iqr', words: 'interquartile range' },
  { kind: 'q', words: 'a quantile…' },
  { kind: 'above', words: 'share above a number…' },
  { kind: 'below', words: 'share below a number…' },
] as const;
type StatKind = (typeof STAT_KINDS)[number]['kind'];

export interface CheckDraft {
  priorOnly: boolean;
  replicates: string;
  statKind: StatKind;
  /** The quantile (0–1) or the number of a share. */
  statArg: string;
}

export function toCheckDraft(s: Pick<FitSettings, 'priorOnly' | 'replicates' | 'checkStat'>): CheckDraft {
  const stat = s.checkStat ?? '';
  const q = /^q(.+)$/.exec(stat);
  const share = /^(above|below):(.+)$/.exec(stat);
  return {
    priorOnly: s.priorOnly ?? false,
    replicates: String(s.replicates ?? CHECK_LIMITS.replicates.default),
    statKind: q ? 'q' : share ? (share[1] as StatKind) : (stat as StatKind),
    statArg: q ? (q[1].startsWith('.') ? `0${q[1]}` : q[1]) : share ? share[2] : '',
  };
}

/**
 * The draft's fields as settings for the shared schema to judge: absent when at their defaults
 * (so settings saved before the checks existed do not change), NaN for a number that is not one.
 */
export function checkCandidate(d: CheckDraft): Partial<Pick<FitSettings, 'priorOnly' | 'replicates' | 'checkStat'>> {
  const out: Partial<Pick<FitSettings, 'priorOnly' | 'replicates' | 'checkStat'>> = {};
  if (d.priorOnly) out.priorOnly = true;
  const r = d.replicates.trim();
  const n = /^\d+$/.test(r) ? Number(r) : NaN;
  if (n !== CHECK_LIMITS.replicates.default) out.replicates = n;
  const arg = d.statArg.trim();
  if (d.statKind === 'median' || d.statKind === 'iqr') out.checkStat = d.statKind;
  else if (d.statKind === 'q') out.checkStat = `q${arg}`;
  else if (d.statKind === 'above' || d.statKind === 'below') out.checkStat = `${d.statKind}:${arg}`;
  return out;
}

/** Field messages for the checks' settings from the schema's issues (keyed by field). */
export function checkFieldError(key: string, raw: CheckDraft): string | null {
  if (key === 'replicates') {
    if (!/^\d+$/.test(raw.replicates.trim())) return raw.replicates.trim() === '' ? 'Required' : `"${raw.replicates}" is not a whole number`;
    return `Between ${CHECK_LIMITS.replicates.min} and ${CHECK_LIMITS.replicates.max}`;
  }
  if (key === 'checkStat') return raw.statKind === 'q' ? 'A quantile between 0 and 1, e.g. 0.9' : 'A number, e.g. 10 or -2.5';
  return null;
}

export interface CheckSettingsFieldsProps {
  draft: CheckDraft;
  errors: Partial<Record<'replicates' | 'checkStat', string>>;
  disabled: boolean;
  onChange: (d: CheckDraft) => void;
}

/** The fit settings' part about checks: before the data, replicated data sets, the user's statistic. */
export function CheckSettingsFields({ draft, errors, disabled, onChange }: CheckSettingsFieldsProps) {
  const uid = useId();
  const set = (patch: Partial<CheckDraft>) => onChange({ ...draft, ...patch });
  const needsArg = draft.statKind === 'q' || draft.statKind === 'above' || draft.statKind === 'below';
  const preview = checkCandidate(draft).checkStat;
  return (
    <fieldset className="flex min-w-0 flex-col gap-3" data-testid="check-settings" disabled={disabled}>
      <legend className="mb-[0.4rem] text-[0.8rem] text-ink-soft">Checks against the data</legend>
      <div className="min-w-0">
        <label className="flex items-center gap-2 text-sm">
          <input type="checkbox" checked={draft.priorOnly} onChange={(e) => set({ priorOnly: e.target.checked })} />
          <span className="font-semibold">Before the data: priors and constraints only</span>
        </label>
        <p className="mt-[0.2rem] text-[0.72rem] whitespace-normal text-ink-soft">
          Leaves out every term line that reads a data column, to see what the model expects before seeing the data. The run is labelled as a prior run.
        </p>
      </div>
      <div className="grid gap-3" style={{ gridTemplateColumns: 'repeat(auto-fit, minmax(12rem, 1fr))' }}>
        <Field
          htmlFor={`${uid}-reps`}
          label="Replicated data sets"
          error={errors.replicates}
          hint={
            <>
              {CHECK_LIMITS.replicates.min}–{CHECK_LIMITS.replicates.max}, default {CHECK_LIMITS.replicates.default} · for models with a replicate line
            </>
          }
        >
          <input
            id={`${uid}-reps`}
            className={compactControlClass}
            inputMode="numeric"
            value={draft.replicates}
            aria-invalid={errors.replicates ? true : undefined}
            onChange={(e) => set({ replicates: e.target.value })}
          />
        </Field>
        <Field
          htmlFor={`${uid}-stat`}
          label="Your own statistic"
          error={errors.checkStat}
          hint={preview ? `also checks the ${describeStat(preview)}, overall and per group` : 'beside mean, sd, smallest, largest and share of zeros'}
        >
          <div className="flex gap-2">
            <select
              id={`${uid}-stat`}
              className={compactControlClass}
              style={{ fontFamily: 'inherit' }}
              value={draft.statKind}
              onChange={(e) => set({ statKind: e.target.value as StatKind, statArg: e.target.value === 'q' && draft.statKind !== 'q' ? '0.9' : draft.statArg })}
            >
              {STAT_KINDS.map((k) => (
                <option key={k.kind} value={k.kind}>
                  {k.words}
                </option>
              ))}
            </select>
            {needsArg && (
              <input
                className={compactControlClass}
                style={{ width: '6rem' }}
                inputMode="decimal"
                aria-label={draft.statKind === 'q' ? 'Quantile (between 0 and 1)' : 'Number'}
                value={draft.statArg}
                aria-invalid={errors.checkStat ? true : undefined}
                onChange={(e) => set({ statArg: e.target.value })}
              />
            )}
          </div>
        </Field>
      </div>
    </fieldset>
  );
}
