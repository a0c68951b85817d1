import { useMutation, useQueryClient } from '@tanstack/react-query';
import { renameNotebookBody, type RenameNotebookBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const renameNotebookInputSchema = renameNotebookBody;

export async function renameNotebook({
  workspaceId,
  notebookId,
  ...body
}: RenameNotebookBody & { workspaceId: string; notebookId: string }) {
  const { notebook } = await callRoute('renameNotebook', { params: { workspaceId, notebookId }, body });
  return notebook;
}

export function useRenameNotebook() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: renameNotebook,
    onSuccess: (_n, { workspaceId, notebookId }) =>
      Promise.all([
        qc.invalidateQueries({ queryKey: queryKeys.notebookList(workspaceId) }),
        qc.invalidateQueries({ queryKey: queryKeys.notebook(workspaceId, notebookId), exact: true }),
      ]),
  });
}
