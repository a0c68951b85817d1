import { useState } from 'react';
import { ROLES, type Member, type Role } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Select } from '@/components/ui/input';
import { Table, TBody, Td, Th, THead, Tr } from '@/components/ui/table';
import { ROLE_LABEL, RoleBadge } from '@/components/role-badge';
import { errorMessage } from '@/lib/api-client';
import { formatDate } from '@/lib/format';
import { useChangeRole } from '../api/change-role';
import { useRemoveMember } from '../api/remove-member';
import { isLastOwner, isLastOwnerError, LAST_OWNER_HELP, LAST_OWNER_TITLE } from './last-owner';

/**
 * Members and their roles. Owners (`canManage`) get a role picker and a Remove button per row;
 * the only owner's row keeps both disabled and says why.
 */
export function MemberTable({
  workspaceId,
  members,
  currentUserId,
  canManage,
}: {
  workspaceId: string;
  members: Member[];
  currentUserId: string | undefined;
  canManage: boolean;
}) {
  const changeRole = useChangeRole();
  const remove = useRemoveMember();
  const [removing, setRemoving] = useState<Member | null>(null);
  const failure = changeRole.error ?? remove.error;

  const sorted = [...members].sort(
    (a, b) => ROLES.indexOf(a.role) - ROLES.indexOf(b.role) || a.name.localeCompare(b.name),
  );

  const removeButton = (m: Member, lastOwner: boolean) => (
    <Button
      variant="quiet"
      size="sm"
      disabled={lastOwner}
      title={lastOwner ? LAST_OWNER_TITLE : undefined}
      onClick={() => {
        changeRole.reset();
        setRemoving(m);
      }}
    >
      Remove
    </Button>
  );

  return (
    <div className="flex flex-col gap-3">
      {failure && (
        <Banner tone="notice" title={isLastOwnerError(failure) ? LAST_OWNER_TITLE : 'That change was not made'}>
          {errorMessage(failure)}
          {isLastOwnerError(failure) && <> {LAST_OWNER_HELP}</>}
        </Banner>
      )}
      <Table caption="Members">
        <THead>
          <tr>
            <Th className="max-sm:px-2!">Name</Th>
            {/* On a phone the e-mail moves under the name, the join date gives way cells narrow their padding. */}
            <Th className="hidden sm:table-cell">E-mail</Th>
            <Th className="max-sm:px-2!">Role</Th>
            <Th numeric className="hidden sm:table-cell">Joined</Th>
            {canManage && (
              <Th className="w-0 max-sm:px-2!">
                <span className="sr-only">Actions</span>
              </Th>
            )}
          </tr>
        </THead>
        <TBody>
          {sorted.map((m) => {
            const lastOwner = isLastOwner(m, members);
            const you = m.userId === currentUserId;
            return (
              <Tr key={m.userId} data-testid={`member-${m.email}`}>
                <Td className="max-sm:px-2!">
                  <span className="font-medium">{m.name}</span>
                  {you && <span className="ml-2 text-xs text-ink-faint">(you)</span>}
                  <span className="block text-xs break-all text-ink-soft sm:hidden">{m.email}</span>
                </Td>
                <Td className="hidden text-ink-soft sm:table-cell">{m.email}</Td>
                <Td className="max-sm:px-2!">
                  {canManage ? (
                    <div className="flex flex-col gap-1">
                      <Select
                        label={`Role of ${m.name}`}
                        hideLabel
                        value={m.role}
                        disabled={lastOwner || (changeRole.isPending && changeRole.variables?.userId === m.userId)}
                        onChange={(e) => {
                          remove.reset();
                          changeRole.mutate({ workspaceId, userId: m.userId, role: e.target.value as Role });
                        }}
                        className="w-full min-w-28 sm:w-36"
                      >
                        {ROLES.map((r) => (
                          <option key={r} value={r}>
                            {ROLE_LABEL[r]}
                          </option>
                        ))}
                      </Select>
                      {lastOwner && <span className="text-xs text-ink-faint">Only owner — cannot step down</span>}
                    </div>
                  ) : (
                    <RoleBadge role={m.role} />
                  )}
                </Td>
                <Td numeric className="hidden text-ink-soft sm:table-cell">
                  {formatDate(m.joinedAt)}
                </Td>
                {canManage && <Td className="text-right max-sm:px-2!">{removeButton(m, lastOwner)}</Td>}
              </Tr>
            );
          })}
        </TBody>
      </Table>
      {removing && (
        <Dialog
          open
          onClose={() => setRemoving(null)}
          title={`Remove ${removing.name}?`}
          description={
            <>
              {removing.email} loses access to this workspace at once. You can invite them again later.
            </>
          }
          footer={
            <>
              <Button variant="quiet" onClick={() => setRemoving(null)}>
                Cancel
              </Button>
              <Button
                variant="destructive"
                pending={remove.isPending}
                onClick={() =>
                  remove.mutate(
                    { workspaceId, userId: removing.userId },
                    { onSettled: () => setRemoving(null) },
                  )
                }
              >
                Remove member
              </Button>
            </>
          }
        />
      )}
    </div>
  );
}
