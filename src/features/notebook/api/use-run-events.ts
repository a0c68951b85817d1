import { useEffect } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { routePath } from '@shared/api';
import type { Run } from '@shared/api/notebook';
import { runEventsData } from '@shared/api/notebook-page';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';

/** Notebooks whose event stream is open now: their fit cells need not poll for progress. */
const live = new Set<string>();
const streamKey = (access: NotebookAccess) => (access.mode === 'member' ? `m:${access.workspaceId}/${access.notebookId}` : `s:${access.token}`);

export const runEventsLive = (access: NotebookAccess) => live.has(streamKey(access));

/**
 * Run status, queue place and per-chain progress pushed by the server (server-sent events of the
 * notebook's runs, …/events; finished runs only for share-link readers), merged into each fit
 * cell's run list. While the stream is closed or reconnecting, the fit cells poll as before.
 */
export function useRunEvents(access: NotebookAccess): void {
  const qc = useQueryClient();
  const key = streamKey(access);
  useEffect(() => {
    if (typeof EventSource === 'undefined') return;
    const url =
      access.mode === 'member'
        ? routePath('notebookEvents', { workspaceId: access.workspaceId, notebookId: access.notebookId })
        : routePath('sharedNotebookEvents', { token: access.token });
    const listKey = (cellId: string) =>
      access.mode === 'member' ? nbKeys.cellRuns(access.workspaceId, access.notebookId, cellId) : nbKeys.shared.cellRuns(access.token, cellId);
    const es = new EventSource(url, { withCredentials: true });
    es.addEventListener('open', () => live.add(key));
    es.addEventListener('error', () => {
      // The browser reconnects by itself; meanwhile the fit cells poll again (a refetch makes them
      // look at whether the stream is live).
      if (!live.delete(key)) return;
      void qc.invalidateQueries({ predicate: (q) => q.queryKey.includes('cell-runs') });
    });
    es.addEventListener('runs', (ev) => {
      let parsed;
      try {
        parsed = runEventsData.safeParse(JSON.parse((ev as MessageEvent<string>).data));
      } catch {
        return;
      }
      if (!parsed.success) return;
      for (const run of parsed.data.runs) {
        if (!run.cellId) continue;
        qc.setQueryData(listKey(run.cellId), (old: { runs: Run[] } | undefined) => {
          if (!old) return old; // not loaded yet: its own request brings it
          const i = old.runs.findIndex((r) => r.id === run.id);
          return { runs: i >= 0 ? old.runs.map((r) => (r.id === run.id ? run : r)) : [run, ...old.runs] };
        });
      }
    });
    return () => {
      es.close();
      live.delete(key);
    };
  }, [key]); // eslint-disable-line react-hooks/exhaustive-deps
}
