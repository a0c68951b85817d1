import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** One notebook with its cells in order and the caller's role. */
export function getNotebook(workspaceId: string, notebookId: string) {
  return callRoute('getNotebook', { params: { workspaceId, notebookId } });
}

export const notebookQueryOptions = (workspaceId: string, notebookId: string) =>
  queryOptions({
    queryKey: queryKeys.notebook(workspaceId, notebookId),
    queryFn: () => getNotebook(workspaceId, notebookId),
  });

export function useNotebook(workspaceId: string, notebookId: string) {
  return useQuery(notebookQueryOptions(workspaceId, notebookId));
}
