import { forwardRef, type ButtonHTMLAttributes } from 'react';
import { cn } from '@/lib/cn';
import { Spinner } from './spinner';

export type ButtonVariant = 'primary' | 'secondary' | 'quiet' | 'destructive' | 'slack';
export type ButtonSize = 'xs' | 'sm' | 'md';

const variants: Record<ButtonVariant, string> = {
  primary: 'bg-ink text-sheet border border-ink hover:bg-ink-soft hover:border-ink-soft',
  secondary: 'bg-sheet text-ink border border-rule-strong hover:border-ink-soft hover:bg-white',
  quiet: 'bg-transparent text-ink-soft border border-transparent hover:text-ink hover:bg-sheet-dim',
  destructive:
    'bg-sheet text-notice border border-notice/50 hover:bg-notice hover:text-sheet hover:border-notice',
  /** the accent: starts work that leaves room (a fit, an upload, keeping one's own text) */
  slack: 'bg-slack text-white border border-slack hover:bg-slack-deep hover:border-slack-deep',
};

const sizes: Record<ButtonSize, string> = {
  /** the small tools of a notebook cell */
  xs: 'h-7 px-2.5 text-[0.8rem] gap-1.5',
  sm: 'h-8 px-3 text-[0.8125rem] gap-1.5',
  md: 'h-10 px-4 text-sm gap-2',
};

export type ButtonProps = ButtonHTMLAttributes<HTMLButtonElement> & {
  variant?: ButtonVariant;
  size?: ButtonSize;
  /** Shows a spinner and disables the button while a request is in flight. */
  pending?: boolean;
};

export const buttonClass = (variant: ButtonVariant = 'primary', size: ButtonSize = 'md') =>
  cn(
    'inline-flex items-center justify-center rounded-md font-medium whitespace-nowrap transition-colors',
    'disabled:opacity-50 disabled:pointer-events-none cursor-pointer',
    variants[variant],
    sizes[size],
  );

export const Button = forwardRef<HTMLButtonElement, ButtonProps>(function Button(
  { variant = 'primary', size = 'md', pending = false, className, children, disabled, type, ...rest },
  ref,
) {
  return (
    <button
      ref={ref}
      type={type ?? 'button'}
      className={cn(buttonClass(variant, size), className)}
      disabled={disabled || pending}
      aria-busy={pending || undefined}
      {...rest}
    >
      {pending && <Spinner className="size-3.5" />}
      {children}
    </button>
  );
});
