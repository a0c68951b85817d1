import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export async function getWorkspace(workspaceId: string) {
  const { workspace } = await callRoute('getWorkspace', { params: { workspaceId } });
  return workspace;
}

export const workspaceQueryOptions = (workspaceId: string) =>
  queryOptions({ queryKey: queryKeys.workspace(workspaceId), queryFn: () => getWorkspace(workspaceId) });

export function useWorkspace(workspaceId: string) {
  return useQuery(workspaceQueryOptions(workspaceId));
}
