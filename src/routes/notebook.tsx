import { useState } from 'react';
import type { QueryClient } from '@tanstack/react-query';
import { Link, useNavigate, useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { roleAtLeast } from '@shared/api';
import { PageHeader } from '@/components/layout/page-header';
import { PageTitle } from '@/components/page-title';
import { QueryState } from '@/components/query-state';
import { RoleBadge } from '@/components/role-badge';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { notebookQueryOptions, useNotebook } from '@/features/notebook/api/get-notebook';
import { NotebookView } from '@/features/notebook/components/notebook-view';
import { DeleteNotebookDialog } from '@/features/notebook/components/delete-notebook-dialog';
import { RenameNotebookDialog } from '@/features/notebook/components/rename-notebook-dialog';
import { ShareLinksPanel } from '@/features/share-links/components/share-links-panel';
import { isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { NotFound } from '@/components/not-found';

export const makeLoader = (qc: QueryClient) => async ({ params }: LoaderFunctionArgs) => {
  await qc.prefetchQuery(notebookQueryOptions(params.workspaceId!, params.notebookId!));
  return null;
};

export default function NotebookRoute() {
  const { workspaceId = '', notebookId = '' } = useParams();
  const detail = useNotebook(workspaceId, notebookId);
  const navigate = useNavigate();
  const [dialog, setDialog] = useState<'share' | 'rename' | 'delete' | null>(null);

  if (detail.isError && isApiError(detail.error) && detail.error.status === 404) {
    return <NotFound title="No such notebook">It may have been deleted, or it belongs to a workspace you are not in.</NotFound>;
  }

  return (
    <QueryState query={detail} loadingLabel="Loading notebook…" errorTitle="Could not load this notebook">
      {({ notebook, cells, role, workspaceName }) => {
        const canEdit = roleAtLeast(role, 'editor');
        return (
          <div className="flex flex-col gap-8">
            <PageTitle>{notebook.title}</PageTitle>
            <PageHeader
              eyebrow={
                <Link to={`/w/${workspaceId}`} className="hover:text-ink">
                  {workspaceName} <span aria-hidden="true">/</span> notebooks
                </Link>
              }
              title={notebook.title}
              meta={
                <>
                  <span>
                    <span className="num">{cells.length}</span> {cells.length === 1 ? 'cell' : 'cells'}
                  </span>
                  <span className="text-ink-faint">
                    last change <span className="num">{formatDateTime(notebook.updatedAt)}</span>
                  </span>
                  <RoleBadge role={role} />
                </>
              }
              actions={
                canEdit && (
                  <>
                    <Button size="sm" onClick={() => setDialog('share')}>
                      Share links
                    </Button>
                    <Button variant="secondary" size="sm" onClick={() => setDialog('rename')}>
                      Rename
                    </Button>
                    <Button variant="destructive" size="sm" onClick={() => setDialog('delete')}>
                      Delete
                    </Button>
                  </>
                )
              }
            />
            <NotebookView
              key={notebook.id}
              access={{ mode: 'member', workspaceId, notebookId }}
              cells={cells}
              canEdit={canEdit}
              canComment={roleAtLeast(role, 'reviewer')}
            />
            {canEdit && (
              <>
                <Dialog
                  open={dialog === 'share'}
                  onClose={() => setDialog(null)}
                  size="lg"
                  title="Read-only links"
                  footer={
                    <Button variant="secondary" onClick={() => setDialog(null)}>
                      Done
                    </Button>
                  }
                >
                  <ShareLinksPanel workspaceId={workspaceId} notebookId={notebookId} />
                </Dialog>
                <RenameNotebookDialog notebook={notebook} open={dialog === 'rename'} onClose={() => setDialog(null)} />
                <DeleteNotebookDialog
                  notebook={notebook}
                  open={dialog === 'delete'}
                  onClose={() => setDialog(null)}
                  onDeleted={() => navigate(`/w/${workspaceId}`, { replace: true })}
                />
              </>
            )}
          </div>
        );
      }}
    </QueryState>
  );
}
