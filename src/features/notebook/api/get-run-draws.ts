import { useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';

export function useRunDraws(access: NotebookAccess, runId: string | null) {
  return useQuery({
    queryKey: access.mode === 'member' ? nbKeys.runDraws(access.workspaceId, runId ?? '') : nbKeys.shared.runDraws(access.token, runId ?? ''),
    queryFn: () =>
      access.mode === 'member'
        ? callRoute('getRunDraws', { params: { workspaceId: access.workspaceId, runId: runId! }, query: { max: 1000 } })
        : callRoute('sharedRunDraws', { params: { token: access.token, runId: runId! }, query: { max: 1000 } }),
    enabled: runId !== null,
    staleTime: Infinity,
  });
}
