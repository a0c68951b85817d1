import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export async function getShareLinks(workspaceId: string, notebookId: string) {
  const { links } = await callRoute('listShareLinks', { params: { workspaceId, notebookId } });
  return links;
}

export const shareLinksQueryOptions = (workspaceId: string, notebookId: string) =>
  queryOptions({
    queryKey: queryKeys.shareLinks(workspaceId, notebookId),
    queryFn: () => getShareLinks(workspaceId, notebookId),
  });

export function useShareLinks(workspaceId: string, notebookId: string, enabled = true) {
  return useQuery({ ...shareLinksQueryOptions(workspaceId, notebookId), enabled });
}
