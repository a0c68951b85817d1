import { useState } from 'react';
import type { QueryClient } from '@tanstack/react-query';
import { NavLink, Outlet, useNavigate, useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { roleAtLeast } from '@shared/api';
import { PageHeader } from '@/components/layout/page-header';
import { PageTitle } from '@/components/page-title';
import { QueryState } from '@/components/query-state';
import { RoleBadge } from '@/components/role-badge';
import { Button } from '@/components/ui/button';
import { useWorkspace, workspaceQueryOptions } from '@/features/workspaces/api/get-workspace';
import { DeleteWorkspaceDialog } from '@/features/workspaces/components/delete-workspace-dialog';
import { RenameWorkspaceDialog } from '@/features/workspaces/components/rename-workspace-dialog';
import { isApiError } from '@/lib/api-client';
import { cn } from '@/lib/cn';
import { formatDate } from '@/lib/format';
import { NotFound } from '@/components/not-found';

export const makeLoader = (qc: QueryClient) => async ({ params }: LoaderFunctionArgs) => {
  await qc.prefetchQuery(workspaceQueryOptions(params.workspaceId!));
  return null;
};

const tab = ({ isActive }: { isActive: boolean }) =>
  cn(
    '-mb-px border-b-2 px-1 pb-3 text-sm font-medium transition-colors',
    isActive ? 'border-ink text-ink' : 'border-transparent text-ink-faint hover:text-ink-soft',
  );

/** The frame of a workspace: name, the caller's role, owner actions, and tabs. */
export default function WorkspaceLayout() {
  const { workspaceId = '' } = useParams();
  const workspace = useWorkspace(workspaceId);
  const navigate = useNavigate();
  const [dialog, setDialog] = useState<'rename' | 'delete' | null>(null);

  if (workspace.isError && isApiError(workspace.error) && workspace.error.status === 404) {
    return (
      <NotFound title="No such workspace">
        It may have been deleted, or you are not a member. Ask an owner for an invitation.
      </NotFound>
    );
  }

  return (
    <QueryState query={workspace} loadingLabel="Loading workspace…" errorTitle="Could not load this workspace">
      {(w) => {
        const isOwner = roleAtLeast(w.role, 'owner');
        return (
          <div className="flex flex-col gap-8">
            <PageTitle>{w.name}</PageTitle>
            <PageHeader
              eyebrow="Workspace"
              title={w.name}
              meta={
                <>
                  <span className="inline-flex items-center gap-2">
                    Your role <RoleBadge role={w.role} />
                  </span>
                  <span className="text-ink-faint">
                    created <span className="num">{formatDate(w.createdAt)}</span>
                  </span>
                </>
              }
              actions={
                isOwner && (
                  <>
                    <Button variant="secondary" size="sm" onClick={() => setDialog('rename')}>
                      Rename
                    </Button>
                    <Button variant="destructive" size="sm" onClick={() => setDialog('delete')}>
                      Delete workspace
                    </Button>
                  </>
                )
              }
            />
            <nav aria-label="Workspace sections" className="flex gap-6 border-b border-rule">
              <NavLink to={`/w/${w.id}`} end className={tab}>
                Notebooks
              </NavLink>
              <NavLink to={`/w/${w.id}/members`} className={tab}>
                Members
              </NavLink>
              {isOwner && (
                <NavLink to={`/w/${w.id}/activity`} className={tab}>
                  Activity
                </NavLink>
              )}
            </nav>
            <Outlet context={w} />
            {isOwner && (
              <>
                <RenameWorkspaceDialog workspace={w} open={dialog === 'rename'} onClose={() => setDialog(null)} />
                <DeleteWorkspaceDialog
                  workspace={w}
                  open={dialog === 'delete'}
                  onClose={() => setDialog(null)}
                  onDeleted={() => navigate('/', { replace: true })}
                />
              </>
            )}
          </div>
        );
      }}
    </QueryState>
  );
}
