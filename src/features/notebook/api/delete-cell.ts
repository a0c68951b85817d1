import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useDeleteCell(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (cellId: string) => callRoute('deleteCell', { params: { workspaceId, notebookId, cellId } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.notebook(workspaceId, notebookId), exact: true }),
  });
}
