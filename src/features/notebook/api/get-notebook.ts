import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';
import { getNotebookPage } from './get-notebook-page';

/** One notebook with its cells in order and the caller's role. */
export function getNotebook(workspaceId: string, notebookId: string) {
  return callRoute('getNotebook', { params: { workspaceId, notebookId } });
}

export const notebookQueryOptions = (workspaceId: string, notebookId: string) =>
  queryOptions({
    queryKey: queryKeys.notebook(workspaceId, notebookId),
    // The first load brings the whole screen in one request (get-notebook-page.ts); later
    // refreshes (after a cell is added, moved or removed) read the notebook alone.
    queryFn: ({ client, queryKey }) =>
      client.getQueryData(queryKey) === undefined ? getNotebookPage(client, workspaceId, notebookId) : getNotebook(workspaceId, notebookId),
  });

export function useNotebook(workspaceId: string, notebookId: string) {
  return useQuery(notebookQueryOptions(workspaceId, notebookId));
}
