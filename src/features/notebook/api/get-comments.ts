import { useQuery } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useComments(workspaceId: string, notebookId: string, enabled: boolean) {
  return useQuery({
    queryKey: nbKeys.comments(workspaceId, notebookId),
    queryFn: () => callRoute('listComments', { params: { workspaceId, notebookId } }),
    enabled,
    refetchInterval: enabled ? 15_000 : false,
  });
}
