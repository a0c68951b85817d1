import { useMutation, useQueryClient } from '@tanstack/react-query';
import { renameWorkspaceBody, type RenameWorkspaceBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const renameWorkspaceInputSchema = renameWorkspaceBody;

export async function renameWorkspace({ workspaceId, ...body }: RenameWorkspaceBody & { workspaceId: string }) {
  const { workspace } = await callRoute('renameWorkspace', { params: { workspaceId }, body });
  return workspace;
}

export function useRenameWorkspace() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: renameWorkspace,
    onSuccess: (workspace) => {
      qc.setQueryData(queryKeys.workspace(workspace.id), workspace);
      return qc.invalidateQueries({ queryKey: queryKeys.workspaceList });
    },
  });
}
