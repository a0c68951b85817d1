import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export async function getMembers(workspaceId: string) {
  const { members } = await callRoute('listMembers', { params: { workspaceId } });
  return members;
}

export const membersQueryOptions = (workspaceId: string) =>
  queryOptions({ queryKey: queryKeys.members(workspaceId), queryFn: () => getMembers(workspaceId) });

export function useMembers(workspaceId: string) {
  return useQuery(membersQueryOptions(workspaceId));
}
