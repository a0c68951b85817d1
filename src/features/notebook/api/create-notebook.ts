import { useMutation, useQueryClient } from '@tanstack/react-query';
import { createNotebookBody, type CreateNotebookBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const createNotebookInputSchema = createNotebookBody;

export async function createNotebook({ workspaceId, ...body }: CreateNotebookBody & { workspaceId: string }) {
  const { notebook } = await callRoute('createNotebook', { params: { workspaceId }, body });
  return notebook;
}

export function useCreateNotebook() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createNotebook,
    onSuccess: (_n, { workspaceId }) => qc.invalidateQueries({ queryKey: queryKeys.notebookList(workspaceId) }),
  });
}
