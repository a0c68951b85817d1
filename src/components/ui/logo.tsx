import { cn } from '@/lib/cn';

/**
 * Slackline's mark: two anchors with a taut line between them and a walker on the line.
 * The line is drawn in the accent colour — the room left between two constraints.
 */
export function LogoMark({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 40 28" aria-hidden="true" className={cn('h-6 w-auto', className)}>
      <path d="M3 26 L8 6 L13 26" fill="none" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
      <path d="M27 26 L32 6 L37 26" fill="none" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
      <path d="M8 6.5 L32 6.5" className="stroke-slack" strokeWidth="2.25" strokeLinecap="round" />
      <circle cx="22" cy="6.5" r="2.6" fill="currentColor" />
    </svg>
  );
}

export function Logo({ className }: { className?: string }) {
  return (
    <span className={cn('inline-flex items-center gap-2 text-ink', className)}>
      <LogoMark />
      <span className="text-[1.05rem] font-semibold tracking-[-0.01em]">slackline</span>
    </span>
  );
}
