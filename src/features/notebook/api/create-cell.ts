import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { NbCellKind } from '@shared/api/notebook';
import { callRoute } from '@/lib/api-client';
import { nbKeys } from './keys';

export function useCreateCell(workspaceId: string, notebookId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (v: { kind: NbCellKind; position: number; content?: unknown }) => callRoute('createCell', { params: { workspaceId, notebookId }, body: v }),
    onSuccess: () => qc.invalidateQueries({ queryKey: nbKeys.notebook(workspaceId, notebookId), exact: true }),
  });
}
