import type { ReactNode } from 'react';
import { cn } from '@/lib/cn';

/**
 * A small labelled field around a control of your own (a compact input, a select, a file input):
 * the label above, then either the error (an alert) or the hint. The hint hides while the control
 * is disabled, when the value reads as plain text and the hint would only repeat it.
 */
export function Field({
  htmlFor,
  label,
  hint,
  hintId,
  error,
  className,
  children,
}: {
  htmlFor: string;
  label: ReactNode;
  hint?: ReactNode;
  hintId?: string;
  error?: ReactNode;
  className?: string;
  children: ReactNode;
}) {
  return (
    <div className={cn('group/field', className)}>
      <label htmlFor={htmlFor} className="mb-[0.2rem] block text-[0.75rem] text-ink-soft">
        {label}
      </label>
      {children}
      {error ? (
        <div className="mt-[0.2rem] text-[0.75rem] font-semibold text-ink" role="alert">
          {error}
        </div>
      ) : hint ? (
        <div className="mt-[0.2rem] text-[0.72rem] text-ink-soft group-has-[:disabled]/field:hidden" id={hintId}>
          {hint}
        </div>
      ) : null}
    </div>
  );
}
