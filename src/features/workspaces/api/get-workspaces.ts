import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export async function getWorkspaces() {
  const { workspaces } = await callRoute('listWorkspaces');
  return workspaces;
}

export const workspacesQueryOptions = () => queryOptions({ queryKey: queryKeys.workspaceList, queryFn: getWorkspaces });

export function useWorkspaces() {
  return useQuery(workspacesQueryOptions());
}
