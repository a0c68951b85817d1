import type { FitProgress } from '@shared/fit';
import type { Run } from '@shared/api/notebook';

const PHASE_WORDS: Record<FitProgress['phase'], string> = { warmup: 'warm-up', sampling: 'sampling', done: 'done' };

function ordinal(n: number): string {
  const s = n % 100 >= 11 && n % 100 <= 13 ? 'th' : ({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[n % 10] ?? 'th';
  return `${n}${s}`;
}

/** The line above the bars of a queued or running fit: its place in the queue, or a lost worker. */
export function runStateMessage(run: Pick<Run, 'status' | 'worker' | 'queuePosition'>): { text: string; warning: boolean } | undefined {
  if (run.status === 'queued') {
    const pos = run.queuePosition;
    if (!pos) return { text: 'Waiting for a worker to pick up this fit…', warning: false };
    return { text: pos === 1 ? 'Waiting for a free fit slot: this fit is next in the queue.' : `Waiting for a free fit slot: ${ordinal(pos)} in the queue.`, warning: false };
  }
  if (run.status === 'running' && run.worker === 'lost') {
    return { text: 'Worker lost, resuming: the fit continues from its finished chains as soon as a worker picks it up.', warning: true };
  }
  return undefined;
}

/**
 * One bar per chain. Progress counts warm-up and sampling together (total = warm-up + draws);
 * the warm-up part is drawn hatched.
 */
export function ChainProgress({
  progress,
  chains,
  queuedMessage,
  warning = false,
}: {
  progress: FitProgress[];
  chains: number;
  queuedMessage?: string;
  /** The message is a warning (the worker was lost): shown as a banner, the bars dimmed. */
  warning?: boolean;
}) {
  const byChain = new Map(progress.map((p) => [p.chain, p]));
  return (
    <div className="flex flex-col gap-2" data-testid="chain-progress" data-stale={warning ? 'true' : undefined} style={warning ? { opacity: 0.75 } : undefined}>
      {queuedMessage && (
        <p className={warning ? 'rounded-[3px] border border-rule-strong bg-sheet px-[0.9rem] py-[0.55rem] text-[0.85rem]' : 'truncate text-[0.8rem] text-ink-soft'} role="status">
          {queuedMessage}
        </p>
      )}
      {Array.from({ length: chains }, (_, k) => {
        const p = byChain.get(k + 1);
        const frac = p ? (p.phase === 'done' ? 1 : Math.min(1, p.total > 0 ? p.iteration / p.total : 0)) : 0;
        return (
          <div key={k} className="grid items-center gap-3" style={{ gridTemplateColumns: '4.2rem 1fr 13rem' }}>
            <span className="truncate text-[0.8rem] text-ink-soft">chain {k + 1}</span>
            <div
              className="h-1.5 overflow-hidden rounded-[3px] bg-rule"
              role="progressbar"
              aria-label={`chain ${k + 1}`}
              aria-valuemin={0}
              aria-valuemax={100}
              aria-valuenow={Math.round(frac * 100)}
            >
              <div className="h-full bg-slack transition-[width] duration-300 ease-linear data-[phase=warmup]:bg-[repeating-linear-gradient(135deg,var(--color-slack)_0_6px,#2f8f77_6px_12px)] data-[phase=warmup]:opacity-70" data-phase={p?.phase ?? 'warmup'} style={{ width: `${frac * 100}%` }} />
            </div>
            <span className="font-mono tabular-nums text-right whitespace-nowrap text-xs" style={{ color: 'var(--color-ink-soft)' }}>
              {p ? `${PHASE_WORDS[p.phase]} · ${p.iteration}/${p.total} · ${Math.round(p.itersPerSecond)} it/s` : 'waiting'}
            </span>
          </div>
        );
      })}
    </div>
  );
}
