import { useQuery } from '@tanstack/react-query';
import { callRouteBytes } from '@/lib/api-client';
import { decodeRunDraws } from '@shared/draws-binary';
import type { NotebookAccess } from './access';
import { nbKeys } from './keys';

/** A finished run's draws for the plots: Float32 columns per chain and quantity (shared/draws-binary.ts). */
export function useRunDraws(access: NotebookAccess, runId: string | null) {
  return useQuery({
    queryKey: access.mode === 'member' ? nbKeys.runDraws(access.workspaceId, runId ?? '') : nbKeys.shared.runDraws(access.token, runId ?? ''),
    queryFn: async () =>
      decodeRunDraws(
        access.mode === 'member'
          ? await callRouteBytes('getRunDraws', { params: { workspaceId: access.workspaceId, runId: runId! }, query: { max: 1000 } })
          : await callRouteBytes('sharedRunDraws', { params: { token: access.token, runId: runId! }, query: { max: 1000 } }),
      ),
    enabled: runId !== null,
    staleTime: Infinity,
  });
}
