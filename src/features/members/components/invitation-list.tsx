import type { Invitation } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { Table, TBody, Td, Th, THead, Tr } from '@/components/ui/table';
import { RoleBadge } from '@/components/role-badge';
import { errorMessage } from '@/lib/api-client';
import { formatDateTime, formatRelative } from '@/lib/format';
import { useRevokeInvitation } from '../api/revoke-invitation';

export function InvitationList({ workspaceId, invitations }: { workspaceId: string; invitations: Invitation[] }) {
  const revoke = useRevokeInvitation();
  if (invitations.length === 0) {
    return <EmptyState title="No pending invitations">Invitations you send wait here until they are accepted.</EmptyState>;
  }
  return (
    <div className="flex flex-col gap-3">
      {revoke.isError && <Banner tone="notice">{errorMessage(revoke.error)}</Banner>}
      <Table caption="Pending invitations">
        <THead>
          <tr>
            <Th>E-mail</Th>
            <Th>Role</Th>
            <Th>Invited by</Th>
            <Th numeric>Expires</Th>
            <Th className="w-0">
              <span className="sr-only">Actions</span>
            </Th>
          </tr>
        </THead>
        <TBody>
          {invitations.map((inv) => (
            <Tr key={inv.id}>
              <Td className="font-medium">{inv.email}</Td>
              <Td>
                <RoleBadge role={inv.role} />
              </Td>
              <Td className="text-ink-soft">{inv.invitedBy.name}</Td>
              <Td numeric className="text-ink-soft" title={formatDateTime(inv.expiresAt)}>
                {formatRelative(inv.expiresAt)}
              </Td>
              <Td className="text-right">
                <Button
                  variant="quiet"
                  size="sm"
                  pending={revoke.isPending && revoke.variables?.invitationId === inv.id}
                  onClick={() => revoke.mutate({ workspaceId, invitationId: inv.id })}
                  aria-label={`Revoke invitation for ${inv.email}`}
                >
                  Revoke
                </Button>
              </Td>
            </Tr>
          ))}
        </TBody>
      </Table>
    </div>
  );
}
