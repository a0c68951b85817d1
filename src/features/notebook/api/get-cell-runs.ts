import { useQuery } from '@tanstack/react-query';
import { ACTIVE_RUN_STATUSES } from '@shared/terms';
import type { Run } from '@shared/api/notebook';
import { callRoute } from '@/lib/api-client';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';

const ACTIVE: readonly Run['status'][] = ACTIVE_RUN_STATUSES;

export function useCellRuns(access: NotebookAccess, cellId: string) {
  return useQuery({
    queryKey: access.mode === 'member' ? nbKeys.cellRuns(access.workspaceId, access.notebookId, cellId) : nbKeys.shared.cellRuns(access.token, cellId),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('listCellRuns', { params: { workspaceId: access.workspaceId, notebookId: access.notebookId, cellId } })
        : callRoute('sharedCellRuns', { params: { token: access.token, cellId } }),
    // Poll while a run of this cell is queued or running: that is how progress arrives.
    refetchInterval: (q) => (access.mode === 'member' && q.state.data?.runs.some((r) => ACTIVE.includes(r.status)) ? 1000 : false),
  });
}
