import { useMutation, useQueryClient } from '@tanstack/react-query';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useCollapseCell(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { cellId: string; collapsed: boolean }) =>
      callRoute('collapseCell', { params: { workspaceId, notebookId, cellId: v.cellId }, body: { collapsed: v.collapsed } }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.notebook(workspaceId, notebookId), exact: true }),
  });
}
