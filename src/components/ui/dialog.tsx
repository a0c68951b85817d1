import { useEffect, useId, useRef, type ReactNode } from 'react';
import { cn } from '@/lib/cn';

export type DialogProps = {
  open: boolean;
  onClose: () => void;
  title: ReactNode;
  description?: ReactNode;
  children?: ReactNode;
  /** Buttons shown at the bottom right. */
  footer?: ReactNode;
  /** md: forms and confirmations; lg: panels with a table. */
  size?: 'md' | 'lg';
  className?: string;
};

/**
 * A modal sheet built on the native <dialog> element: focus is trapped by the browser, Escape
 * closes it, the page behind is inert.
 */
export function Dialog({ open, onClose, title, description, children, footer, size = 'md', className }: DialogProps) {
  const ref = useRef<HTMLDialogElement>(null);
  const titleId = useId();
  const descId = useId();

  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    if (open && !el.open) {
      if (typeof el.showModal === 'function') el.showModal();
      else el.setAttribute('open', '');
    } else if (!open && el.open) {
      if (typeof el.close === 'function') el.close();
      else el.removeAttribute('open');
    }
  }, [open]);

  return (
    <dialog
      ref={ref}
      aria-labelledby={titleId}
      aria-describedby={description ? descId : undefined}
      onCancel={(e) => {
        e.preventDefault();
        onClose();
      }}
      onClick={(e) => {
        // a click on the backdrop (the dialog element itself, outside the panel) closes it
        if (e.target === ref.current) onClose();
      }}
      className={cn(
        'm-auto rounded-[var(--radius-card)] border border-rule bg-sheet p-0 text-ink',
        'shadow-[var(--shadow-lift)] backdrop:bg-ink/25 backdrop:backdrop-blur-[1px]',
        size === 'lg' ? 'w-[min(52rem,calc(100vw-2rem))]' : 'w-[min(32rem,calc(100vw-2rem))]',
        className,
      )}
    >
      {open && (
        <div className="flex flex-col gap-4 p-6">
          <div className="flex flex-col gap-1">
            <h2 id={titleId} className="text-lg font-semibold tracking-tight">
              {title}
            </h2>
            {description && (
              <div id={descId} className="text-sm text-ink-soft">
                {description}
              </div>
            )}
          </div>
          {children}
          {footer && <div className="flex justify-end gap-2 pt-2">{footer}</div>}
        </div>
      )}
    </dialog>
  );
}
