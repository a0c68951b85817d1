import { useEffect, useId, useState, type FormEvent } from 'react';
import { FIT_LIMITS, SAMPLERS, fitSettingsSchema, type FitSettings } from '@shared/fit';
import { CheckSettingsFields, checkCandidate, checkFieldError, toCheckDraft, type CheckDraft } from './check-settings';
import { buttonClass } from '@/components/ui/button';
import { compactControlClass } from '@/components/ui/input';
import { Field } from '@/components/ui/field';

const DEFAULTS: FitSettings = fitSettingsSchema.parse({});

const SAMPLER_WORDS: Record<(typeof SAMPLERS)[number], string> = {
  auto: 'automatic (chosen from the model’s structure)',
  rhmc: 'barrier-metric Riemannian HMC',
  'rhmc-gl': 'barrier-metric Riemannian HMC, generalised leapfrog',
  hitrun: 'hit-and-run, rounded directions',
  'hitrun-plain': 'hit-and-run, plain directions',
  'coord-hitrun': 'coordinate hit-and-run',
  'ball-walk': 'ball walk',
  'dikin-walk': 'Dikin walk',
  rwm: 'random-walk Metropolis',
  'transform-hmc': 'HMC on transformed coordinates',
  'reflect-hmc': 'HMC reflecting off the constraints',
};

/** One sentence per engine, shown under the select (docs/engine.md §7 has the details). */
const SAMPLER_SENTENCES: Record<(typeof SAMPLERS)[number], string> = {
  auto: 'Shortlists engines from the model’s structure, runs short pilots during warm-up and keeps the one with the most effective draws per unit of work.',
  rhmc: 'Hamiltonian moves whose metric follows the constraint barrier: slows near the faces instead of leaving the region.',
  'rhmc-gl': 'The same barrier-metric method with the generalised leapfrog integrator.',
  hitrun: 'Moves to a random point on a random chord through the region, directions shaped by the region’s central ellipsoid.',
  'hitrun-plain': 'Moves to a random point on a chord in a uniformly random direction.',
  'coord-hitrun': 'Moves along one unknown at a time, to a random point of that axis’s chord.',
  'ball-walk': 'Proposes a uniform point in a small ball and accepts it with the Metropolis rule.',
  'dikin-walk': 'Proposes a uniform point in the ellipsoid that fits the constraints around the current point, with the Metropolis rule.',
  rwm: 'Gaussian random-walk proposals with a covariance learned in warm-up.',
  'transform-hmc': 'Maps bounds, simplices and orderings to free coordinates and runs plain HMC; only for regions made of those shapes.',
  'reflect-hmc': 'Plain HMC whose trajectories bounce off the constraint faces.',
};

type Draft = Record<'chains' | 'warmup' | 'draws' | 'seed', string> & { sampler: FitSettings['sampler']; checks?: CheckDraft };

const toDraft = (s: FitSettings): Draft => ({
  chains: String(s.chains),
  warmup: String(s.warmup),
  draws: String(s.draws),
  seed: String(s.seed),
  sampler: s.sampler,
  checks: toCheckDraft(s),
});

/** Parse the form's text fields with the shared schema; field messages keyed by field name. */
export function parseFitDraft(d: Draft): { ok: true; settings: FitSettings } | { ok: false; errors: Partial<Record<keyof Draft | 'replicates' | 'checkStat', string>> } {
  const num = (s: string) => (s.trim() === '' || !/^-?\d+(\.\d+)?$/.test(s.trim()) ? NaN : Number(s));
  const candidate = { chains: num(d.chains), warmup: num(d.warmup), draws: num(d.draws), seed: num(d.seed), sampler: d.sampler, ...(d.checks ? checkCandidate(d.checks) : {}) };
  const r = fitSettingsSchema.safeParse(candidate);
  if (r.success) return { ok: true, settings: r.data };
  const errors: Partial<Record<keyof Draft | 'replicates' | 'checkStat', string>> = {};
  for (const issue of r.error.issues) {
    const key = issue.path[0] as keyof Draft;
    if (errors[key]) continue;
    const checkError = d.checks ? checkFieldError(key as string, d.checks) : null;
    if (checkError) {
      errors[key] = checkError;
      continue;
    }
    const raw = (d as Record<string, string>)[key as string];
    if (Number.isNaN((candidate as Record<string, unknown>)[key as string])) errors[key] = raw.trim() === '' ? 'Required' : `"${raw}" is not a whole number`;
    else if (issue.code === 'too_small') errors[key] = `At least ${String(issue.minimum)}`;
    else if (issue.code === 'too_big') errors[key] = `At most ${Number(issue.maximum).toLocaleString('en')}`;
    else if (issue.code === 'invalid_type' && issue.expected === 'int') errors[key] = 'Must be a whole number';
    else errors[key] = issue.message;
  }
  return { ok: false, errors };
}

export interface FitSettingsFormProps {
  value: FitSettings;
  readOnly: boolean;
  running: boolean;
  /** Called with valid settings when the draft changes (for autosave) and on Run. */
  onChange?: (settings: FitSettings) => void;
  onRun?: (settings: FitSettings) => void;
  onCancel?: () => void;
}

const FIELDS = [
  { key: 'chains', label: 'Chains', limits: FIT_LIMITS.chains, hint: 'run in parallel' },
  { key: 'warmup', label: 'Warm-up iterations', limits: FIT_LIMITS.warmup, hint: 'per chain, discarded' },
  { key: 'draws', label: 'Draws', limits: FIT_LIMITS.draws, hint: 'kept per chain' },
] as const;

/** The fit cell's settings: defaults and limits shown, validated with the shared schema. */
export function FitSettingsForm({ value, readOnly, running, onChange, onRun, onCancel }: FitSettingsFormProps) {
  const [draft, setDraft] = useState<Draft>(() => toDraft(value));
  const [errors, setErrors] = useState<Partial<Record<keyof Draft | 'replicates' | 'checkStat', string>>>({});
  const uid = useId();

  // Follow outside changes (another person's save) unless the draft differs on purpose.
  const valueKey = JSON.stringify(value);
  useEffect(() => {
    setDraft(toDraft(value));
    setErrors({});
  }, [valueKey]); // eslint-disable-line react-hooks/exhaustive-deps

  const update = (patch: Partial<Draft>) => {
    const next = { ...draft, ...patch };
    setDraft(next);
    const r = parseFitDraft(next);
    if (r.ok) {
      setErrors({});
      onChange?.(r.settings);
    } else setErrors(r.errors);
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const r = parseFitDraft(draft);
    if (!r.ok) {
      setErrors(r.errors);
      return;
    }
    onRun?.(r.settings);
  };

  const disabled = readOnly || running;
  return (
    <form onSubmit={submit} className="flex flex-col gap-3" aria-label="Fit settings" noValidate>
      <div className="grid gap-3" style={{ gridTemplateColumns: 'repeat(auto-fit, minmax(9rem, 1fr))' }}>
        {FIELDS.map((f) => (
          <Field
            key={f.key}
            htmlFor={`${uid}-${f.key}`}
            label={f.label}
            error={errors[f.key]}
            hintId={`${uid}-${f.key}-hint`}
            hint={
              <>
                {f.limits.min}–{f.limits.max.toLocaleString('en')}, default {DEFAULTS[f.key]} · {f.hint}
              </>
            }
          >
            <input
              id={`${uid}-${f.key}`}
              className={compactControlClass}
              inputMode="numeric"
              value={draft[f.key]}
              disabled={disabled}
              aria-invalid={errors[f.key] ? true : undefined}
              aria-describedby={`${uid}-${f.key}-hint`}
              onChange={(e) => update({ [f.key]: e.target.value } as Partial<Draft>)}
            />
          </Field>
        ))}
        <Field htmlFor={`${uid}-seed`} label="Seed" error={errors.seed} hint="same seed, same draws">
          <input
            id={`${uid}-seed`}
            className={compactControlClass}
            inputMode="numeric"
            value={draft.seed}
            disabled={disabled}
            aria-invalid={errors.seed ? true : undefined}
            onChange={(e) => update({ seed: e.target.value })}
          />
        </Field>
      </div>
      <Field htmlFor={`${uid}-sampler`} label="Sampler" hint={SAMPLER_SENTENCES[draft.sampler]}>
        <select id={`${uid}-sampler`} className={compactControlClass} style={{ fontFamily: 'inherit' }} value={draft.sampler} disabled={disabled} onChange={(e) => update({ sampler: e.target.value as Draft['sampler'] })}>
          {SAMPLERS.map((s) => (
            <option key={s} value={s}>
              {SAMPLER_WORDS[s]}
            </option>
          ))}
        </select>
      </Field>
      <CheckSettingsFields draft={draft.checks ?? toCheckDraft(value)} errors={errors} disabled={disabled} onChange={(checks) => update({ checks })} />
      {!readOnly && (
        <div className="flex items-center gap-2">
          <button type="submit" className={buttonClass('slack', 'xs')} disabled={running || Object.keys(errors).length > 0}>
            Run fit
          </button>
          {running && onCancel && (
            <button type="button" className={buttonClass('secondary', 'xs')} onClick={onCancel}>
              Cancel
            </button>
          )}
          <span className="mt-[0.2rem] text-[0.72rem] text-ink-soft">Ctrl/⌘-Enter runs the current cell</span>
        </div>
      )}
    </form>
  );
}
