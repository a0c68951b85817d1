import type { FitProgress } from '@shared/fit';

const PHASE_WORDS: Record<FitProgress['phase'], string> = { warmup: 'warm-up', sampling: 'sampling', done: 'done' };

/**
 * One bar per chain. Progress counts warm-up and sampling together (total = warm-up + draws);
 * the warm-up part is drawn hatched.
 */
export function ChainProgress({ progress, chains, queuedMessage }: { progress: FitProgress[]; chains: number; queuedMessage?: string }) {
  const byChain = new Map(progress.map((p) => [p.chain, p]));
  return (
    <div className="flex flex-col gap-2" data-testid="chain-progress">
      {queuedMessage && <p className="sl-cell-sub">{queuedMessage}</p>}
      {Array.from({ length: chains }, (_, k) => {
        const p = byChain.get(k + 1);
        const frac = p ? (p.phase === 'done' ? 1 : Math.min(1, p.total > 0 ? p.iteration / p.total : 0)) : 0;
        return (
          <div key={k} className="grid items-center gap-3" style={{ gridTemplateColumns: '4.2rem 1fr 13rem' }}>
            <span className="sl-cell-sub">chain {k + 1}</span>
            <div
              className="sl-progress-track"
              role="progressbar"
              aria-label={`chain ${k + 1}`}
              aria-valuemin={0}
              aria-valuemax={100}
              aria-valuenow={Math.round(frac * 100)}
            >
              <div className="sl-progress-fill" data-phase={p?.phase ?? 'warmup'} style={{ width: `${frac * 100}%` }} />
            </div>
            <span className="sl-num text-xs" style={{ color: 'var(--sl-ink-soft)' }}>
              {p ? `${PHASE_WORDS[p.phase]} · ${p.iteration}/${p.total} · ${Math.round(p.itersPerSecond)} it/s` : 'waiting'}
            </span>
          </div>
        );
      })}
    </div>
  );
}
