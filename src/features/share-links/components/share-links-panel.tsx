import { useState } from 'react';
import type { ShareLink } from '@shared/api';
import { Badge } from '@/components/ui/badge';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { FieldError, Input, Select } from '@/components/ui/input';
import { LoadingBlock } from '@/components/ui/spinner';
import { Table, TBody, Td, Th, THead, Tr } from '@/components/ui/table';
import { errorMessage } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { useFormErrors } from '@/lib/use-form-errors';
import { useCreateShareLink } from '../api/create-share-link';
import { useShareLinks } from '../api/get-share-links';
import { useRevokeShareLink } from '../api/revoke-share-link';
import { CopyField } from './copy-field';
import { EXPIRY_CHOICES, expiryToIso, type ExpiryChoice } from './expiry';

export function LinkStatus({ link }: { link: ShareLink }) {
  if (link.active) return <Badge tone="slack">Active</Badge>;
  if (link.revokedAt) return <Badge>Revoked</Badge>;
  return <Badge>Expired</Badge>;
}

function CreateShareLinkForm({ workspaceId, notebookId }: { workspaceId: string; notebookId: string }) {
  const create = useCreateShareLink();
  const errors = useFormErrors(create.error, ['expiresAt']);
  const [choice, setChoice] = useState<ExpiryChoice>('7d');
  const [date, setDate] = useState('');
  const [dateError, setDateError] = useState<string>();

  return (
    <div className="flex flex-col gap-4">
      <form
        noValidate
        aria-label="Create a share link"
        className="flex flex-col gap-3 sm:flex-row sm:items-end"
        onSubmit={(e) => {
          e.preventDefault();
          const expiresAt = expiryToIso(choice, date);
          if (expiresAt === undefined) {
            setDateError('Pick a date');
            return;
          }
          create.mutate({ workspaceId, notebookId, expiresAt });
        }}
      >
        <Select
          label="Lifetime"
          name="expiry"
          value={choice}
          onChange={(e) => {
            setChoice(e.target.value as ExpiryChoice);
            setDateError(undefined);
            errors.onEdit('expiresAt');
          }}
          className="sm:w-56"
        >
          {EXPIRY_CHOICES.map((c) => (
            <option key={c.value} value={c.value}>
              {c.label}
            </option>
          ))}
        </Select>
        {choice === 'date' && (
          <Input
            label="Last day"
            name="date"
            type="date"
            value={date}
            min={new Date().toISOString().slice(0, 10)}
            onChange={(e) => {
              setDate(e.target.value);
              setDateError(undefined);
              errors.onEdit('expiresAt');
            }}
            error={dateError}
            className="sm:w-44"
          />
        )}
        <Button type="submit" pending={create.isPending}>
          Create link
        </Button>
      </form>
      {errors.field('expiresAt') && <FieldError>{errors.field('expiresAt')}</FieldError>}
      {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
      {create.isSuccess && (
        <div className="flex flex-col gap-3 rounded-md border border-slack/25 bg-slack-soft/50 p-4">
          <p className="text-sm font-semibold">Link created — copy it now, it is shown only once.</p>
          <CopyField label="Read-only link" value={create.data.url} />
        </div>
      )}
    </div>
  );
}

/** Share links of one notebook: create (optionally expiring), copy once, revoke. */
export function ShareLinksPanel({ workspaceId, notebookId }: { workspaceId: string; notebookId: string }) {
  const links = useShareLinks(workspaceId, notebookId);
  const revoke = useRevokeShareLink();
  return (
    <div className="flex flex-col gap-6">
      <p className="text-sm text-ink-soft">
        Anyone holding a link can read this notebook — nothing else in the workspace, and nothing can be changed through
        it. Revoke a link to close it at once.
      </p>
      <CreateShareLinkForm workspaceId={workspaceId} notebookId={notebookId} />
      {revoke.isError && <Banner tone="notice">{errorMessage(revoke.error)}</Banner>}
      {links.isPending ? (
        <LoadingBlock label="Loading links…" />
      ) : links.isError ? (
        <Banner tone="notice" title="Could not load the links">
          {errorMessage(links.error)}
        </Banner>
      ) : links.data.length === 0 ? (
        <EmptyState title="No links yet">Links you create for this notebook are listed here.</EmptyState>
      ) : (
        <Table caption="Share links">
          <THead>
            <tr>
              <Th>Status</Th>
              <Th className="hidden sm:table-cell">Created by</Th>
              <Th numeric className="hidden sm:table-cell">Created</Th>
              <Th numeric>Expires</Th>
              <Th className="w-0">
                <span className="sr-only">Actions</span>
              </Th>
            </tr>
          </THead>
          <TBody>
            {links.data.map((l) => (
              <Tr key={l.id}>
                <Td>
                  <LinkStatus link={l} />
                  {/* On a phone the creator and the creation date move here, so Revoke stays on screen. */}
                  <span className="block text-xs text-ink-soft sm:hidden">
                    by {l.createdBy.name}, {formatDateTime(l.createdAt)}
                  </span>
                </Td>
                <Td className="hidden sm:table-cell">{l.createdBy.name}</Td>
                <Td numeric className="hidden text-ink-soft sm:table-cell">
                  {formatDateTime(l.createdAt)}
                </Td>
                <Td numeric className="text-ink-soft">
                  {l.revokedAt ? `revoked ${formatDateTime(l.revokedAt)}` : l.expiresAt ? formatDateTime(l.expiresAt) : 'never'}
                </Td>
                <Td className="text-right">
                  {l.active && (
                    <Button
                      variant="quiet"
                      size="sm"
                      pending={revoke.isPending && revoke.variables?.linkId === l.id}
                      onClick={() => revoke.mutate({ workspaceId, notebookId, linkId: l.id })}
                    >
                      Revoke
                    </Button>
                  )}
                </Td>
              </Tr>
            ))}
          </TBody>
        </Table>
      )}
    </div>
  );
}
