import { useEffect, useRef } from 'react';
import { buttonClass } from '@/components/ui/button';

export interface ConflictDialogProps {
  kindLabel: string;
  /** The text as it is stored now (someone else saved it), and its version. */
  theirs: string;
  theirVersion: number;
  /** The text in this browser that could not be saved. */
  mine: string;
  /** Keep my text: save it on top of their version. */
  onKeepMine: () => void;
  /** Take their text: drop my edit (it stays on the clipboard offer below). */
  onTakeTheirs: () => void;
}

/**
 * Shown when a save was based on a stale version. Both texts are on screen; nothing is lost until
 * the person chooses, and "take theirs" offers to copy theirs-and-mine first.
 */
export function ConflictDialog({ kindLabel, theirs, theirVersion, mine, onKeepMine, onTakeTheirs }: ConflictDialogProps) {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => {
    ref.current?.focus();
  }, []);
  return (
    <div className="fixed inset-0 z-50 flex items-center justify-center bg-[rgba(34,40,43,0.35)]">
      <div className="max-h-[90vh] max-w-[min(960px,94vw)] overflow-auto rounded border border-rule-strong bg-sheet px-[1.2rem] py-[1.1rem] shadow-[0_24px_48px_-24px_rgba(34,40,43,0.5)]" role="alertdialog" aria-modal="true" aria-labelledby="conflict-title" tabIndex={-1} ref={ref}>
        <h2 id="conflict-title" className="text-lg font-semibold">
          This {kindLabel.toLowerCase()} cell was changed by someone else
        </h2>
        <p className="text-sm" style={{ margin: '0.3rem 0 0.8rem', color: 'var(--color-ink-soft)' }}>
          Your edit was not saved, because the cell moved on to version {theirVersion} while you were typing. Both texts are below; choose which one to keep.
        </p>
        <div className="grid gap-3 md:grid-cols-2">
          <div>
            <h3 className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack" style={{ marginBottom: '0.3rem' }}>Saved now (version {theirVersion})</h3>
            <pre className="max-h-[45vh] overflow-auto border border-rule bg-white p-[0.6rem] font-mono text-[0.78rem] whitespace-pre-wrap" data-testid="conflict-theirs">{theirs}</pre>
          </div>
          <div>
            <h3 className="text-[0.7rem] font-semibold tracking-[0.14em] text-ink-soft uppercase group-data-[active=true]/cell:text-slack" style={{ marginBottom: '0.3rem' }}>Yours (not saved)</h3>
            <pre className="max-h-[45vh] overflow-auto border border-rule bg-white p-[0.6rem] font-mono text-[0.78rem] whitespace-pre-wrap" data-testid="conflict-mine">{mine}</pre>
          </div>
        </div>
        <div className="flex flex-wrap gap-2" style={{ marginTop: '0.9rem' }}>
          <button type="button" className={buttonClass('slack', 'xs')} onClick={onKeepMine}>
            Keep mine (save over version {theirVersion})
          </button>
          <button type="button" className={buttonClass('secondary', 'xs')} onClick={onTakeTheirs}>
            Take the saved text
          </button>
          <button
            type="button"
            className={buttonClass('quiet', 'xs')}
            onClick={() => void navigator.clipboard?.writeText(mine)}
            title="Copy your text before taking the saved one"
          >
            Copy mine
          </button>
        </div>
      </div>
    </div>
  );
}
