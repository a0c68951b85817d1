import { useMutation, useQueryClient } from '@tanstack/react-query';
import { invitationTokenBody, type InvitationTokenBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const acceptInvitationInputSchema = invitationTokenBody;

export async function acceptInvitation(input: InvitationTokenBody) {
  const { workspace } = await callRoute('acceptInvitation', { body: input });
  return workspace;
}

export function useAcceptInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: acceptInvitation,
    // the preview stays cached as it is: dropping it would refetch a token that is now used up
    onSuccess: (workspace) => {
      qc.setQueryData(queryKeys.workspace(workspace.id), workspace);
      return qc.invalidateQueries({ queryKey: queryKeys.workspaceList });
    },
  });
}
