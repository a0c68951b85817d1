import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useMoveCell(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { cellId: string; direction: 'up' | 'down' }) =>
      callRoute('moveCell', { params: { workspaceId, notebookId, cellId: v.cellId }, body: { direction: v.direction } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.notebook(workspaceId, notebookId), exact: true }),
  });
}
