import type { QueryClient } from '@tanstack/react-query';
import { useOutletContext, type LoaderFunctionArgs } from 'react-router-dom';
import { roleAtLeast, type Workspace } from '@shared/api';
import { Section } from '@/components/layout/page-header';
import { QueryState } from '@/components/query-state';
import { Banner } from '@/components/ui/banner';
import { auditQueryOptions, useAudit } from '@/features/audit/api/get-audit';
import { AuditList } from '@/features/audit/components/audit-list';
import { membersQueryOptions, useMembers } from '@/features/members/api/get-members';

export const makeLoader = (qc: QueryClient) => async ({ params }: LoaderFunctionArgs) => {
  const workspaceId = params.workspaceId!;
  await Promise.all([qc.prefetchQuery(auditQueryOptions(workspaceId)), qc.prefetchQuery(membersQueryOptions(workspaceId))]);
  return null;
};

function Activity({ workspace }: { workspace: Workspace }) {
  const audit = useAudit(workspace.id);
  const members = useMembers(workspace.id);
  return (
    <Section title="Activity" description="Who changed roles, invitations and share links, and who deleted what.">
      <QueryState query={audit} loadingLabel="Loading activity…" errorTitle="Could not load the activity">
        {(entries) => <AuditList entries={entries} members={members.data ?? []} />}
      </QueryState>
    </Section>
  );
}

export default function WorkspaceActivityRoute() {
  const workspace = useOutletContext<Workspace>();
  if (!roleAtLeast(workspace.role, 'owner')) {
    return <Banner tone="info" title="Owners only">The activity record of a workspace is kept for its owners.</Banner>;
  }
  return <Activity workspace={workspace} />;
}
