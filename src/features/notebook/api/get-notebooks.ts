import { queryOptions, useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export async function getNotebooks(workspaceId: string) {
  const { notebooks } = await callRoute('listNotebooks', { params: { workspaceId } });
  return notebooks;
}

export const notebooksQueryOptions = (workspaceId: string) =>
  queryOptions({ queryKey: queryKeys.notebookList(workspaceId), queryFn: () => getNotebooks(workspaceId) });

export function useNotebooks(workspaceId: string) {
  return useQuery(notebooksQueryOptions(workspaceId));
}
