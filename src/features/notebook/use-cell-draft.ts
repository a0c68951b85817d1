import { useCallback, useEffect, useRef, useState } from 'react';
import type { NbCell } from '@shared/api/notebook';

export type SaveState = 'saved' | 'unsaved' | 'saving' | 'error' | 'conflict';

export interface DraftConflict {
  /** The cell as stored now (someone else's save). */
  current: NbCell;
  /** What this browser tried to save. */
  mine: { source: string; content: unknown };
}

export interface SaveResult {
  cell: NbCell;
}

/** Thrown by `save` when the base version is stale; carries the stored cell. */
export interface ConflictLike {
  conflict: { current: NbCell };
}

const isConflict = (e: unknown): e is ConflictLike => typeof e === 'object' && e !== null && 'conflict' in e && typeof (e as ConflictLike).conflict?.current === 'object';

/**
 * Local draft of one cell with autosave: edits are kept here and saved after a pause, each save
 * based on the last version this browser knows. A stale save stops autosaving and exposes both
 * texts; nothing is dropped until the person chooses (keep mine → save on top of theirs; take
 * theirs → adopt the stored text).
 */
export function useCellDraft(
  cell: NbCell,
  save: (body: { baseVersion: number; source?: string; content?: unknown }) => Promise<SaveResult>,
  opts: { delayMs?: number; readOnly?: boolean; onSaved?: (cell: NbCell) => void } = {},
) {
  const delay = opts.delayMs ?? 700;
  const [source, setSourceState] = useState(cell.source);
  const [content, setContentState] = useState<unknown>(cell.content);
  const [state, setState] = useState<SaveState>('saved');
  const [error, setError] = useState<string | null>(null);
  const [conflict, setConflict] = useState<DraftConflict | null>(null);
  const [version, setVersion] = useState(cell.version);

  const base = useRef(cell.version);
  const draft = useRef({ source: cell.source, content: cell.content as unknown });
  const changed = useRef({ source: false, content: false });
  const edits = useRef(0);
  const inFlight = useRef(false);
  const blocked = useRef(false);
  const timer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const saveRef = useRef(save);
  saveRef.current = save;
  const onSavedRef = useRef(opts.onSaved);
  onSavedRef.current = opts.onSaved;

  // Adopt newer stored versions (another person's save, a refetch) while nothing is pending here.
  useEffect(() => {
    if (cell.version > base.current && !changed.current.source && !changed.current.content && !inFlight.current && !blocked.current) {
      base.current = cell.version;
      draft.current = { source: cell.source, content: cell.content };
      setSourceState(cell.source);
      setContentState(cell.content);
      setVersion(cell.version);
    }
  }, [cell.version, cell.source, cell.content]);

  const flush = useCallback(async (): Promise<void> => {
    if (timer.current) {
      clearTimeout(timer.current);
      timer.current = null;
    }
    if (inFlight.current || blocked.current) return;
    if (!changed.current.source && !changed.current.content) return;
    const body: { baseVersion: number; source?: string; content?: unknown } = { baseVersion: base.current };
    if (changed.current.source) body.source = draft.current.source;
    if (changed.current.content) body.content = draft.current.content;
    const editsAtStart = edits.current;
    inFlight.current = true;
    setState('saving');
    try {
      const { cell: saved } = await saveRef.current(body);
      base.current = saved.version;
      setVersion(saved.version);
      if (edits.current === editsAtStart) {
        changed.current = { source: false, content: false };
        setState('saved');
      } else setState('unsaved');
      setError(null);
      onSavedRef.current?.(saved);
    } catch (e) {
      if (isConflict(e)) {
        blocked.current = true;
        setConflict({ current: e.conflict.current, mine: { ...draft.current } });
        setState('conflict');
      } else {
        setState('error');
        setError(e instanceof Error ? e.message : 'Could not save');
      }
    } finally {
      inFlight.current = false;
    }
    if (!blocked.current && (changed.current.source || changed.current.content) && edits.current !== editsAtStart) {
      timer.current = setTimeout(() => void flush(), delay);
    }
  }, [delay]);

  const schedule = useCallback(() => {
    edits.current++;
    setState((s) => (s === 'conflict' ? s : 'unsaved'));
    if (blocked.current) return;
    if (timer.current) clearTimeout(timer.current);
    timer.current = setTimeout(() => void flush(), delay);
  }, [delay, flush]);

  const setSource = useCallback(
    (s: string) => {
      if (opts.readOnly) return;
      draft.current = { ...draft.current, source: s };
      changed.current.source = true;
      setSourceState(s);
      schedule();
    },
    [schedule, opts.readOnly],
  );

  const setContent = useCallback(
    (c: unknown) => {
      if (opts.readOnly) return;
      draft.current = { ...draft.current, content: c };
      changed.current.content = true;
      setContentState(c);
      schedule();
    },
    [schedule, opts.readOnly],
  );

  /** Save my text on top of the version that won. */
  const keepMine = useCallback(async () => {
    if (!conflict) return;
    base.current = conflict.current.version;
    blocked.current = false;
    setConflict(null);
    changed.current = { source: true, content: conflict.current.kind !== 'notes' && conflict.current.kind !== 'model' };
    await flush();
  }, [conflict, flush]);

  /** Drop my edit and adopt the stored text. */
  const takeTheirs = useCallback(() => {
    if (!conflict) return;
    const c = conflict.current;
    base.current = c.version;
    draft.current = { source: c.source, content: c.content };
    changed.current = { source: false, content: false };
    blocked.current = false;
    setSourceState(c.source);
    setContentState(c.content);
    setVersion(c.version);
    setConflict(null);
    setState('saved');
  }, [conflict]);

  useEffect(() => () => {
    if (timer.current) clearTimeout(timer.current);
  }, []);

  return { source, content, setSource, setContent, state, error, conflict, keepMine, takeTheirs, flush, version };
}
