import type { WorkspaceShareLink } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { Table, TBody, Td, Th, THead, Tr } from '@/components/ui/table';
import { errorMessage } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { useRevokeShareLink } from '../api/revoke-share-link';
import { LinkStatus } from './share-links-panel';

/** For owners: every read-only link of the workspace, who made it, and a way to close it. */
export function WorkspaceShareLinks({ workspaceId, links }: { workspaceId: string; links: WorkspaceShareLink[] }) {
  const revoke = useRevokeShareLink();
  if (links.length === 0) {
    return <EmptyState title="No share links">Read-only links made for any notebook of this workspace are listed here.</EmptyState>;
  }
  return (
    <div className="flex flex-col gap-3">
      {revoke.isError && <Banner tone="notice">{errorMessage(revoke.error)}</Banner>}
      <Table caption="Share links of this workspace">
        <THead>
          <tr>
            <Th className="max-sm:px-2!">Notebook</Th>
            <Th className="hidden sm:table-cell">Created by</Th>
            <Th className="max-sm:px-2!">Status</Th>
            <Th numeric className="hidden sm:table-cell">Created</Th>
            <Th className="max-sm:px-2!" numeric>Expires</Th>
            <Th className="max-sm:px-2! w-0">
              <span className="sr-only">Actions</span>
            </Th>
          </tr>
        </THead>
        <TBody>
          {links.map((l) => (
            <Tr key={l.id}>
              <Td className="max-sm:px-2! font-medium">
                {l.notebookTitle}
                {/* On a phone the creator and the creation date move here, so the actions stay on screen. */}
                <span className="block text-xs font-normal text-ink-soft sm:hidden">
                  by {l.createdBy.name}, {formatDateTime(l.createdAt)}
                </span>
              </Td>
              <Td className="hidden sm:table-cell">{l.createdBy.name}</Td>
              <Td className="max-sm:px-2!">
                <LinkStatus link={l} />
              </Td>
              <Td numeric className="hidden text-ink-soft sm:table-cell">
                {formatDateTime(l.createdAt)}
              </Td>
              <Td numeric className="max-sm:px-2! text-ink-soft">
                {l.revokedAt ? `revoked ${formatDateTime(l.revokedAt)}` : l.expiresAt ? formatDateTime(l.expiresAt) : 'never'}
              </Td>
              <Td className="max-sm:px-2! text-right">
                {l.active && (
                  <Button
                    variant="quiet"
                    size="sm"
                    pending={revoke.isPending && revoke.variables?.linkId === l.id}
                    onClick={() => revoke.mutate({ workspaceId, notebookId: l.notebookId, linkId: l.id })}
                  >
                    Revoke
                  </Button>
                )}
              </Td>
            </Tr>
          ))}
        </TBody>
      </Table>
    </div>
  );
}
