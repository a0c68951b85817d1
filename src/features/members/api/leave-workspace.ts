import { useMutation, useQueryClient } from '@tanstack/react-query';
import { workspaceParams } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Path parameters only; this is the schema the server validates them with. */
export const leaveWorkspaceInputSchema = workspaceParams;

export function leaveWorkspace({ workspaceId }: { workspaceId: string }) {
  return callRoute('leaveWorkspace', { params: { workspaceId }, body: {} });
}

export function useLeaveWorkspace() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: leaveWorkspace,
    onSuccess: (_v, { workspaceId }) => {
      qc.removeQueries({ queryKey: queryKeys.workspace(workspaceId) });
      return qc.invalidateQueries({ queryKey: queryKeys.workspaceList });
    },
  });
}
