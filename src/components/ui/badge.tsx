import type { ReactNode } from 'react';
import { cn } from '@/lib/cn';

export type BadgeTone = 'plain' | 'slack' | 'notice' | 'alarm' | 'outline';

const tones: Record<BadgeTone, string> = {
  plain: 'bg-sheet-dim text-ink-soft border-rule',
  slack: 'bg-slack-soft text-slack-deep border-slack/25',
  notice: 'bg-notice-soft text-notice border-notice/25',
  /** only for failed diagnostics */
  alarm: 'bg-alarm-soft text-alarm border-alarm/30',
  outline: 'bg-transparent text-ink-soft border-rule-strong',
};

export function Badge({ tone = 'plain', children, className }: { tone?: BadgeTone; children: ReactNode; className?: string }) {
  return (
    <span
      className={cn(
        'inline-flex items-center gap-1 rounded-full border px-2 py-0.5 text-[0.6875rem] font-semibold tracking-wide',
        tones[tone],
        className,
      )}
    >
      {children}
    </span>
  );
}
