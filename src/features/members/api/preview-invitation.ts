import { queryOptions, useQuery } from '@tanstack/react-query';
import { invitationTokenBody } from '@shared/api';
import { callRoute } from '@/lib/api-client';
import { queryKeys } from '@/lib/query-keys';

export const previewInvitationInputSchema = invitationTokenBody;

export async function previewInvitation(token: string) {
  const { invitation } = await callRoute('previewInvitation', { body: { token } });
  return invitation;
}

export const invitationPreviewQueryOptions = (token: string) =>
  queryOptions({ queryKey: queryKeys.invitationPreview(token), queryFn: () => previewInvitation(token), staleTime: 0 });

export function useInvitationPreview(token: string, enabled: boolean) {
  return useQuery({ ...invitationPreviewQueryOptions(token), enabled });
}
