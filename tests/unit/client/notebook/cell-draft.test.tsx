// @vitest-environment happy-dom
import { afterEach, describe, expect, it, vi } from 'vitest';
import { act, cleanup, renderHook } from '@testing-library/react';
import { useCellDraft } from '../../../../src/features/notebook/use-cell-draft';
import type { NbCell } from '../../../../shared/api/notebook';

afterEach(() => {
  cleanup();
  vi.useRealTimers();
});

const cell = (over: Partial<NbCell> = {}): NbCell => ({
  id: 'c1', notebookId: 'n1', kind: 'model', position: 0, source: 'unknown a', content: null, version: 3, collapsed: false,
  createdAt: '2026-12-01T00:00:00Z', updatedAt: '2026-12-01T00:00:00Z', ...over,
});

/** A tiny stand-in for the server's compare-and-set save. */
function fakeServer(start: NbCell) {
  let stored = { ...start };
  const save = vi.fn(async (body: { baseVersion: number; source?: string; content?: unknown }) => {
    if (body.baseVersion !== stored.version) throw { conflict: { current: { ...stored } } };
    stored = { ...stored, source: body.source ?? stored.source, content: body.content ?? stored.content, version: stored.version + 1 };
    return { cell: { ...stored } };
  });
  return { save, get: () => stored, otherSaves: (source: string) => (stored = { ...stored, source, version: stored.version + 1 }) };
}

describe('cell autosave with versions', () => {
  it('saves after a pause, based on the known version', async () => {
    vi.useFakeTimers();
    const server = fakeServer(cell());
    const { result } = renderHook(() => useCellDraft(cell(), server.save, { delayMs: 500 }));
    act(() => result.current.setSource('unknown a\nunknown b'));
    expect(result.current.state).toBe('unsaved');
    expect(server.save).not.toHaveBeenCalled();
    await act(async () => {
      await vi.advanceTimersByTimeAsync(600);
    });
    expect(server.save).toHaveBeenCalledWith({ baseVersion: 3, source: 'unknown a\nunknown b' });
    expect(result.current.state).toBe('saved');
    expect(result.current.version).toBe(4);
  });

  it('a stale save becomes a conflict holding both texts; nothing is lost, then keep mine saves on top', async () => {
    vi.useFakeTimers();
    const server = fakeServer(cell());
    server.otherSaves('unknown theirs'); // someone else saved version 4
    const { result } = renderHook(() => useCellDraft(cell(), server.save, { delayMs: 100 }));
    act(() => result.current.setSource('unknown mine'));
    await act(async () => {
      await vi.advanceTimersByTimeAsync(150);
    });
    expect(result.current.state).toBe('conflict');
    expect(result.current.conflict?.current.source).toBe('unknown theirs');
    expect(result.current.conflict?.mine.source).toBe('unknown mine');
    expect(result.current.source).toBe('unknown mine'); // my text is still in the editor
    expect(server.get().source).toBe('unknown theirs'); // and theirs was not overwritten
    // Further typing does not save behind the person's back while the conflict is open.
    act(() => result.current.setSource('unknown mine2'));
    await act(async () => {
      await vi.advanceTimersByTimeAsync(500);
    });
    expect(server.save).toHaveBeenCalledTimes(1);
    await act(async () => {
      await result.current.keepMine();
    });
    expect(server.get().source).toBe('unknown mine2');
    expect(server.get().version).toBe(5);
    expect(result.current.state).toBe('saved');
  });

  it('take theirs adopts the stored text and version', async () => {
    vi.useFakeTimers();
    const server = fakeServer(cell());
    server.otherSaves('unknown theirs');
    const { result } = renderHook(() => useCellDraft(cell(), server.save, { delayMs: 100 }));
    act(() => result.current.setSource('unknown mine'));
    await act(async () => {
      await vi.advanceTimersByTimeAsync(150);
    });
    act(() => result.current.takeTheirs());
    expect(result.current.source).toBe('unknown theirs');
    expect(result.current.version).toBe(4);
    expect(result.current.state).toBe('saved');
  });

  it('read-only drafts never save', async () => {
    const server = fakeServer(cell());
    const { result } = renderHook(() => useCellDraft(cell(), server.save, { delayMs: 1, readOnly: true }));
    act(() => result.current.setSource('x'));
    await new Promise((r) => setTimeout(r, 10));
    expect(server.save).not.toHaveBeenCalled();
    expect(result.current.source).toBe('unknown a');
  });
});
