import { useQuery } from '@tanstack/react-query';
import { ACTIVE_RUN_STATUSES } from '@shared/terms';
import type { Run } from '@shared/api/notebook';
import { callRoute } from '@/lib/api-client';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';
import { runEventsLive } from './use-run-events';

const ACTIVE: readonly Run['status'][] = ACTIVE_RUN_STATUSES;

export function useCellRuns(access: NotebookAccess, cellId: string) {
  return useQuery({
    queryKey: access.mode === 'member' ? nbKeys.cellRuns(access.workspaceId, access.notebookId, cellId) : nbKeys.shared.cellRuns(access.token, cellId),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('listCellRuns', { params: { workspaceId: access.workspaceId, notebookId: access.notebookId, cellId } })
        : callRoute('sharedCellRuns', { params: { token: access.token, cellId } }),
    // Progress arrives by server-sent events (use-run-events.ts); without a live stream, poll
    // while a run of this cell is queued or running.
    refetchInterval: (q) => (access.mode === 'member' && !runEventsLive(access) && q.state.data?.runs.some((r) => ACTIVE.includes(r.status)) ? 1000 : false),
  });
}
