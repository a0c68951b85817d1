import type { ReactNode } from 'react';
import { cn } from '@/lib/cn';

export type BannerTone = 'info' | 'slack' | 'notice' | 'alarm';

const tones: Record<BannerTone, { box: string; mark: string }> = {
  info: { box: 'bg-sheet border-rule text-ink', mark: 'bg-ink-faint' },
  slack: { box: 'bg-slack-soft/60 border-slack/25 text-ink', mark: 'bg-slack' },
  notice: { box: 'bg-notice-soft/70 border-notice/25 text-ink', mark: 'bg-notice' },
  /** only for failed diagnostics */
  alarm: { box: 'bg-alarm-soft border-alarm/40 text-ink', mark: 'bg-alarm' },
};

/** A full-width message with a coloured rule on its left edge. */
export function Banner({
  tone = 'info',
  title,
  children,
  action,
  className,
  role,
}: {
  tone?: BannerTone;
  title?: ReactNode;
  children?: ReactNode;
  action?: ReactNode;
  className?: string;
  role?: 'status' | 'alert';
}) {
  const t = tones[tone];
  return (
    <div
      role={role ?? (tone === 'notice' || tone === 'alarm' ? 'alert' : 'status')}
      className={cn('relative flex items-start gap-4 overflow-hidden rounded-md border py-3 pr-4 pl-5 text-sm', t.box, className)}
    >
      <span aria-hidden="true" className={cn('absolute inset-y-0 left-0 w-1', t.mark)} />
      <div className="flex min-w-0 flex-1 flex-col gap-0.5">
        {title && <p className="font-semibold">{title}</p>}
        {children && <div className="text-ink-soft">{children}</div>}
      </div>
      {action && <div className="shrink-0">{action}</div>}
    </div>
  );
}
