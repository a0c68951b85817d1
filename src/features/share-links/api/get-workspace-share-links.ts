import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Every share link of a workspace with its notebook and creator (owners only). */
export async function getWorkspaceShareLinks(workspaceId: string) {
  const { links } = await callRoute('listWorkspaceShareLinks', { params: { workspaceId } });
  return links;
}

export const workspaceShareLinksQueryOptions = (workspaceId: string) =>
  queryOptions({ queryKey: queryKeys.workspaceShareLinks(workspaceId), queryFn: () => getWorkspaceShareLinks(workspaceId) });

/** Only owners may list them; pass `enabled: false` for everyone else. */
export function useWorkspaceShareLinks(workspaceId: string, enabled = true) {
  return useQuery({ ...workspaceShareLinksQueryOptions(workspaceId), enabled });
}
