import { useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';
import { getRunDrawsBinary } from './get-run-draws-binary';

export function useRunDraws(access: NotebookAccess, runId: string | null) {
  return useQuery({
    queryKey: access.mode === 'member' ? nbKeys.runDraws(access.workspaceId, runId ?? '') : nbKeys.shared.runDraws(access.token, runId ?? ''),
    queryFn: ({ signal }) =>
      access.mode === 'member'
        ? getRunDrawsBinary(access.workspaceId, runId!, 1000, signal)
        : callRoute('sharedRunDraws', { params: { token: access.token, runId: runId! }, query: { max: 1000 } }),
    enabled: runId !== null,
    staleTime: Infinity,
  });
}
