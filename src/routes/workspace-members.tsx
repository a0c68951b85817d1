import type { QueryClient } from '@tanstack/react-query';
import { useNavigate, useOutletContext, type LoaderFunctionArgs } from 'react-router-dom';
import { roleAtLeast, type Workspace } from '@shared/api';
import { Section } from '@/components/layout/page-header';
import { QueryState } from '@/components/query-state';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { useMe } from '@/features/auth/api/get-me';
import { useMembers, membersQueryOptions } from '@/features/members/api/get-members';
import { invitationsQueryOptions, useInvitations } from '@/features/members/api/get-invitations';
import { useLeaveWorkspace } from '@/features/members/api/leave-workspace';
import { InvitationList } from '@/features/members/components/invitation-list';
import { InviteForm } from '@/features/members/components/invite-form';
import { isLastOwnerError, LAST_OWNER_HELP, LAST_OWNER_TITLE } from '@/features/members/components/last-owner';
import { MemberTable } from '@/features/members/components/member-table';
import { workspaceQueryOptions } from '@/features/workspaces/api/get-workspace';
import { useWorkspaceShareLinks, workspaceShareLinksQueryOptions } from '@/features/share-links/api/get-workspace-share-links';
import { WorkspaceShareLinks } from '@/features/share-links/components/workspace-share-links';
import { errorMessage } from '@/lib/api-client';

export const makeLoader = (qc: QueryClient) => async ({ params }: LoaderFunctionArgs) => {
  const workspaceId = params.workspaceId!;
  const members = qc.prefetchQuery(membersQueryOptions(workspaceId));
  try {
    const w = await qc.ensureQueryData(workspaceQueryOptions(workspaceId));
    if (roleAtLeast(w.role, 'owner')) {
      await Promise.all([qc.prefetchQuery(invitationsQueryOptions(workspaceId)), qc.prefetchQuery(workspaceShareLinksQueryOptions(workspaceId))]);
    }
  } catch {
    // the layout shows the workspace's own error
  }
  await members;
  return null;
};

function LeaveWorkspace({ workspace }: { workspace: Workspace }) {
  const leave = useLeaveWorkspace();
  const navigate = useNavigate();
  return (
    <Section
      title="Leave this workspace"
      description="You lose access to its notebooks until someone invites you again."
      actions={
        <Button
          variant="destructive"
          size="sm"
          pending={leave.isPending}
          onClick={() => leave.mutate({ workspaceId: workspace.id }, { onSuccess: () => navigate('/', { replace: true }) })}
        >
          Leave workspace
        </Button>
      }
    >
      {leave.isError && (
        <Banner tone="notice" title={isLastOwnerError(leave.error) ? LAST_OWNER_TITLE : 'You are still a member'}>
          {errorMessage(leave.error)}
          {isLastOwnerError(leave.error) && <> {LAST_OWNER_HELP}</>}
        </Banner>
      )}
    </Section>
  );
}

export default function WorkspaceMembersRoute() {
  const workspace = useOutletContext<Workspace>();
  const isOwner = roleAtLeast(workspace.role, 'owner');
  const me = useMe();
  const members = useMembers(workspace.id);
  const invitations = useInvitations(workspace.id, isOwner);
  const shareLinks = useWorkspaceShareLinks(workspace.id, isOwner);

  return (
    <div className="flex flex-col gap-12">
      <Section
        title="Members"
        description={isOwner ? 'Change a role with its picker; changes apply at once.' : 'Only owners change roles and invite people.'}
      >
        <QueryState query={members} loadingLabel="Loading members…" errorTitle="Could not load the members">
          {(list) => <MemberTable workspaceId={workspace.id} members={list} currentUserId={me.data?.id} canManage={isOwner} />}
        </QueryState>
      </Section>
      {isOwner && (
        <Section title="Invite someone" description="They receive a link by e-mail and join once they accept it, signed in with that address.">
          <div className="sheet p-5">
            <InviteForm workspaceId={workspace.id} />
          </div>
        </Section>
      )}
      {isOwner && (
        <Section title="Pending invitations">
          <QueryState query={invitations} loadingLabel="Loading invitations…" errorTitle="Could not load the invitations">
            {(list) => <InvitationList workspaceId={workspace.id} invitations={list} />}
          </QueryState>
        </Section>
      )}
      {isOwner && (
        <Section
          title="Share links"
          description="Read-only links to notebooks of this workspace. A member's links stop working when they drop below editor or leave."
        >
          <QueryState query={shareLinks} loadingLabel="Loading share links…" errorTitle="Could not load the share links">
            {(list) => <WorkspaceShareLinks workspaceId={workspace.id} links={list} />}
          </QueryState>
        </Section>
      )}
      <LeaveWorkspace workspace={workspace} />
    </div>
  );
}
