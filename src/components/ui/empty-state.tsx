import type { ReactNode } from 'react';
import { cn } from '@/lib/cn';

/**
 * Shown where a list has nothing in it yet. The drawing is a slack line between two anchors —
 * room left to fill.
 */
export function EmptyState({
  title,
  children,
  action,
  className,
}: {
  title: ReactNode;
  children?: ReactNode;
  action?: ReactNode;
  className?: string;
}) {
  return (
    <div
      className={cn(
        'flex flex-col items-center gap-3 rounded-[var(--radius-card)] border border-dashed border-rule-strong px-6 py-12 text-center',
        className,
      )}
    >
      <svg viewBox="0 0 120 36" aria-hidden="true" className="h-9 w-28 text-ink-faint">
        <path d="M8 32 L14 8 L20 32" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinejoin="round" />
        <path d="M100 32 L106 8 L112 32" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinejoin="round" />
        <path d="M14 8 Q60 30 106 8" fill="none" className="stroke-slack" strokeWidth="1.75" strokeLinecap="round" />
      </svg>
      <p className="font-semibold text-ink">{title}</p>
      {children && <div className="max-w-sm text-sm text-ink-soft">{children}</div>}
      {action && <div className="pt-1">{action}</div>}
    </div>
  );
}
