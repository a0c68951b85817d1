import { useMutation, useQueryClient } from '@tanstack/react-query';
import { notebookParams } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Path parameters only; this is the schema the server validates them with. */
export const deleteNotebookInputSchema = notebookParams;

export function deleteNotebook({ workspaceId, notebookId }: { workspaceId: string; notebookId: string }) {
  return callRoute('deleteNotebook', { params: { workspaceId, notebookId } });
}

export function useDeleteNotebook() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: deleteNotebook,
    onSuccess: (_v, { workspaceId, notebookId }) => {
      // only when no page shows it any more: removing a watched query would refetch a deleted notebook
      qc.removeQueries({ queryKey: queryKeys.notebook(workspaceId, notebookId), type: 'inactive' });
      return qc.invalidateQueries({ queryKey: queryKeys.notebookList(workspaceId) });
    },
  });
}
