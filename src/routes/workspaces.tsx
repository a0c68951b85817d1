import type { QueryClient } from '@tanstack/react-query';
import { useNavigate } from 'react-router-dom';
import { PageHeader, Section } from '@/components/layout/page-header';
import { PageTitle } from '@/components/page-title';
import { QueryState } from '@/components/query-state';
import { useMe } from '@/features/auth/api/get-me';
import { useWorkspaces, workspacesQueryOptions } from '@/features/workspaces/api/get-workspaces';
import { CreateWorkspaceForm } from '@/features/workspaces/components/create-workspace-form';
import { WorkspaceList } from '@/features/workspaces/components/workspace-list';

export const makeLoader = (qc: QueryClient) => async () => {
  await qc.prefetchQuery(workspacesQueryOptions());
  return null;
};

export default function WorkspacesRoute() {
  const me = useMe();
  const workspaces = useWorkspaces();
  const navigate = useNavigate();
  const firstName = me.data?.name.split(/\s+/)[0];
  return (
    <div className="flex flex-col gap-10">
      <PageTitle>Workspaces</PageTitle>
      <PageHeader
        eyebrow="Workspaces"
        title={firstName ? `Good to see you, ${firstName}` : 'Your workspaces'}
        meta="Each workspace keeps one project's notebooks, data and fits, and the people who work on them."
      />
      <div className="sheet p-5">
        <CreateWorkspaceForm onCreated={(w) => navigate(`/w/${w.id}`)} />
      </div>
      <Section title="Your workspaces">
        <QueryState query={workspaces} loadingLabel="Loading workspaces…" errorTitle="Could not load your workspaces">
          {(list) => <WorkspaceList workspaces={list} />}
        </QueryState>
      </Section>
    </div>
  );
}
