import { useMutation, useQueryClient } from '@tanstack/react-query';
import { invitationParams } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

/** Path parameters only; this is the schema the server validates them with. */
export const revokeInvitationInputSchema = invitationParams;

export function revokeInvitation({ workspaceId, invitationId }: { workspaceId: string; invitationId: string }) {
  return callRoute('revokeInvitation', { params: { workspaceId, invitationId } });
}

export function useRevokeInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: revokeInvitation,
    onSuccess: (_v, { workspaceId }) => qc.invalidateQueries({ queryKey: queryKeys.invitations(workspaceId) }),
  });
}
