/** The comparisons of a compare cell (members and share-link readers), polled while one is active. */
import { useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { ACTIVE_RUN_STATUSES } from '@shared/terms';
import type { NotebookAccess } from './access';

export const compareRunsKey = (access: NotebookAccess, cellId: string) =>
  access.mode === 'member'
    ? (['workspace', access.workspaceId, 'notebook', access.notebookId, 'compare-runs', cellId] as const)
    : (['shared-notebook', access.token, 'compare-runs', cellId] as const);

const ACTIVE: readonly string[] = ACTIVE_RUN_STATUSES;

export function useCompareRuns(access: NotebookAccess, cellId: string) {
  return useQuery({
    queryKey: compareRunsKey(access, cellId),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('listCompareRuns', { params: { workspaceId: access.workspaceId, notebookId: access.notebookId, cellId } })
        : callRoute('sharedCompareRuns', { params: { token: access.token, cellId } }),
    // Progress arrives by polling while a comparison of this cell is queued or running.
    refetchInterval: (q) => (access.mode === 'member' && q.state.data?.runs.some((r) => ACTIVE.includes(r.status)) ? 1000 : false),
  });
}
