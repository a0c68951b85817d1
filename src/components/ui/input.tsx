import { forwardRef, useId, type InputHTMLAttributes, type ReactNode, type SelectHTMLAttributes } from 'react';
import { cn } from '@/lib/cn';

const control =
  'w-full rounded-md border bg-white px-3 text-sm text-ink placeholder:text-ink-faint/70 ' +
  'transition-colors outline-none focus:border-ink focus:ring-2 focus:ring-ink/10';

/**
 * A compact control for settings inside a page (a notebook cell's fields and pickers): numbers in
 * tabular mono; disabled, it reads as text on the page rather than as a field waiting for input.
 */
export const compactControlClass =
  'w-full rounded-[3px] border border-rule-strong bg-white px-2 py-[0.35rem] font-mono text-[0.85rem] text-ink tabular-nums ' +
  'focus:outline-2 focus:-outline-offset-1 focus:outline-slack ' +
  'aria-[invalid=true]:border-ink aria-[invalid=true]:shadow-[inset_0_-2px_0_var(--color-ink)] ' +
  'disabled:cursor-default disabled:appearance-none disabled:rounded-none disabled:border-transparent disabled:border-b-rule-strong disabled:border-dashed ' +
  'disabled:bg-transparent disabled:pl-0 disabled:text-ink-soft disabled:opacity-100 disabled:[-webkit-text-fill-color:var(--color-ink-soft)]';

export type InputProps = InputHTMLAttributes<HTMLInputElement> & {
  label: ReactNode;
  /** The message shown under the field; also marks the control invalid. */
  error?: string;
  hint?: ReactNode;
};

/** A labelled text input with its own hint and field-level error message. */
export const Input = forwardRef<HTMLInputElement, InputProps>(function Input(
  { label, error, hint, id, className, ...rest },
  ref,
) {
  const autoId = useId();
  const inputId = id ?? autoId;
  const hintId = hint ? `${inputId}-hint` : undefined;
  const errorId = error ? `${inputId}-error` : undefined;
  return (
    <div className={cn('flex flex-col gap-1.5', className)}>
      <label htmlFor={inputId} className="text-[0.8125rem] font-medium text-ink-soft">
        {label}
      </label>
      <input
        ref={ref}
        id={inputId}
        aria-invalid={error ? true : undefined}
        aria-describedby={[hintId, errorId].filter(Boolean).join(' ') || undefined}
        className={cn(control, 'h-10', error ? 'border-notice' : 'border-rule-strong')}
        {...rest}
      />
      {hint && !error && (
        <p id={hintId} className="text-xs text-ink-faint">
          {hint}
        </p>
      )}
      {error && <FieldError id={errorId}>{error}</FieldError>}
    </div>
  );
});

export function FieldError({ id, children }: { id?: string; children: ReactNode }) {
  return (
    <p id={id} className="flex items-start gap-1.5 text-xs font-medium text-notice">
      <svg viewBox="0 0 12 12" aria-hidden="true" className="mt-[3px] size-2.5 shrink-0">
        <path d="M1 11 L6 1 L11 11 Z" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinejoin="round" />
      </svg>
      <span>{children}</span>
    </p>
  );
}

export type SelectProps = SelectHTMLAttributes<HTMLSelectElement> & {
  label: ReactNode;
  error?: string;
  /** Visually hide the label (still read by screen readers). */
  hideLabel?: boolean;
};

export const Select = forwardRef<HTMLSelectElement, SelectProps>(function Select(
  { label, error, hideLabel, id, className, children, ...rest },
  ref,
) {
  const autoId = useId();
  const selectId = id ?? autoId;
  const errorId = error ? `${selectId}-error` : undefined;
  return (
    <div className={cn('flex flex-col gap-1.5', className)}>
      <label
        htmlFor={selectId}
        className={hideLabel ? 'sr-only' : 'text-[0.8125rem] font-medium text-ink-soft'}
      >
        {label}
      </label>
      <select
        ref={ref}
        id={selectId}
        aria-invalid={error ? true : undefined}
        aria-describedby={errorId}
        className={cn(control, 'pr-8', hideLabel ? 'h-8 text-[0.8125rem]' : 'h-10', error ? 'border-notice' : 'border-rule-strong')}
        {...rest}
      >
        {children}
      </select>
      {error && <FieldError id={errorId}>{error}</FieldError>}
    </div>
  );
});
