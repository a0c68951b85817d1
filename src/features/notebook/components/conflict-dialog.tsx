import { useEffect, useRef } from 'react';

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
    <div className="sl-dialog-backdrop">
      <div className="sl-dialog" role="alertdialog" aria-modal="true" aria-labelledby="conflict-title" tabIndex={-1} ref={ref}>
        <h2 id="conflict-title" className="text-lg font-semibold">
          This {kindLabel.toLowerCase()} cell was changed by someone else
        </h2>
        <p className="text-sm" style={{ margin: '0.3rem 0 0.8rem', color: 'var(--sl-ink-soft)' }}>
          Your edit was not saved, because the cell moved on to version {theirVersion} while you were typing. Both texts are below; choose which one to keep.
        </p>
        <div className="grid gap-3 md:grid-cols-2">
          <div>
            <h3 className="sl-kind" style={{ marginBottom: '0.3rem' }}>Saved now (version {theirVersion})</h3>
            <pre className="sl-pre" data-testid="conflict-theirs">{theirs}</pre>
          </div>
          <div>
            <h3 className="sl-kind" style={{ marginBottom: '0.3rem' }}>Yours (not saved)</h3>
            <pre className="sl-pre" data-testid="conflict-mine">{mine}</pre>
          </div>
        </div>
        <div className="flex flex-wrap gap-2" style={{ marginTop: '0.9rem' }}>
          <button type="button" className="sl-btn sl-btn-primary" onClick={onKeepMine}>
            Keep mine (save over version {theirVersion})
          </button>
          <button type="button" className="sl-btn sl-btn-outline" onClick={onTakeTheirs}>
            Take the saved text
          </button>
          <button
            type="button"
            className="sl-btn"
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
