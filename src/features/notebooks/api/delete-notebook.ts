import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export function deleteNotebook({ workspaceId, notebookId }: { workspaceId: string; notebookId: string }) {
  return callRoute('deleteNotebook', { params: { workspaceId, notebookId } });
}

export function useDeleteNotebook() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: deleteNotebook,
    onSuccess: (_v, { workspaceId, notebookId }) => {
      qc.removeQueries({ queryKey: queryKeys.notebook(workspaceId, notebookId) });
      return qc.invalidateQueries({ queryKey: queryKeys.notebookList(workspaceId) });
    },
  });
}
