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
      // only when no page shows it any more: removing a watched query would refetch a workspace we just left
      qc.removeQueries({ queryKey: queryKeys.workspace(workspaceId), type: 'inactive' });
      return qc.invalidateQueries({ queryKey: queryKeys.workspaceList });
    },
  });
}
