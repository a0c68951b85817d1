import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { Notebook } from '@shared/api';
import { Button } from '@/components/ui/button';
import { EmptyState } from '@/components/ui/empty-state';
import { Table, TBody, Td, Th, THead, Tr } from '@/components/ui/table';
import { formatDateTime } from '@/lib/format';
import { DeleteNotebookDialog } from './delete-notebook-dialog';
import { RenameNotebookDialog } from './rename-notebook-dialog';

/** Notebooks of a workspace; rename and delete appear only for those allowed to edit. */
export function NotebookList({ notebooks, canEdit }: { notebooks: Notebook[]; canEdit: boolean }) {
  const [renaming, setRenaming] = useState<Notebook | null>(null);
  const [deleting, setDeleting] = useState<Notebook | null>(null);

  if (notebooks.length === 0) {
    return (
      <EmptyState title="No notebooks here yet">
        {canEdit
          ? 'A notebook is a column of cells: notes, data, a model, its fits. Start one above.'
          : 'When an editor starts a notebook in this workspace it will be listed here.'}
      </EmptyState>
    );
  }
  return (
    <>
      <Table caption="Notebooks">
        <THead>
          <tr>
            <Th>Title</Th>
            <Th numeric>Last change</Th>
            {/* On a phone the creation date gives way, so that Rename and Delete stay on screen. */}
            <Th numeric className="hidden sm:table-cell">Created</Th>
            {canEdit && (
              <Th className="w-0">
                <span className="sr-only">Actions</span>
              </Th>
            )}
          </tr>
        </THead>
        <TBody>
          {notebooks.map((n) => (
            <Tr key={n.id}>
              <Td>
                <Link
                  to={`/w/${n.workspaceId}/n/${n.id}`}
                  className="font-medium text-ink underline-offset-4 hover:underline"
                >
                  {n.title}
                </Link>
              </Td>
              <Td numeric className="text-ink-soft">
                {formatDateTime(n.updatedAt)}
              </Td>
              <Td numeric className="hidden text-ink-soft sm:table-cell">
                {formatDateTime(n.createdAt)}
              </Td>
              {canEdit && (
                <Td className="whitespace-nowrap">
                  <div className="flex flex-col items-end gap-1 sm:flex-row sm:justify-end">
                    <Button variant="quiet" size="sm" onClick={() => setRenaming(n)} aria-label={`Rename ${n.title}`}>
                      Rename
                    </Button>
                    <Button variant="quiet" size="sm" onClick={() => setDeleting(n)} aria-label={`Delete ${n.title}`}>
                      Delete
                    </Button>
                  </div>
                </Td>
              )}
            </Tr>
          ))}
        </TBody>
      </Table>
      {renaming && <RenameNotebookDialog notebook={renaming} open onClose={() => setRenaming(null)} />}
      {deleting && <DeleteNotebookDialog notebook={deleting} open onClose={() => setDeleting(null)} />}
    </>
  );
}
