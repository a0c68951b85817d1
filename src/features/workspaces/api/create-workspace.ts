import { useMutation, useQueryClient } from '@tanstack/react-query';
import { createWorkspaceBody, type CreateWorkspaceBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const createWorkspaceInputSchema = createWorkspaceBody;

export async function createWorkspace(input: CreateWorkspaceBody) {
  const { workspace } = await callRoute('createWorkspace', { body: input });
  return workspace;
}

export function useCreateWorkspace() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createWorkspace,
    onSuccess: (workspace) => {
      qc.setQueryData(queryKeys.workspace(workspace.id), workspace);
      return qc.invalidateQueries({ queryKey: queryKeys.workspaceList });
    },
  });
}
