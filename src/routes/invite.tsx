import { Link, useLocation, useNavigate, useParams, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layout/auth-layout';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClass } from '@/components/ui/button';
import { LoadingBlock } from '@/components/ui/spinner';
import { ROLE_DESCRIPTION, ROLE_LABEL } from '@/components/role-badge';
import { useMe } from '@/features/auth/api/get-me';
import { useSignOut } from '@/features/auth/api/sign-out';
import { useAcceptInvitation } from '@/features/members/api/accept-invitation';
import { useInvitationPreview } from '@/features/members/api/preview-invitation';
import { errorMessage, isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/format';
import { withNext } from '@/lib/safe-next';

function InvalidInvitation({ message }: { message: string }) {
  return (
    <Banner
      tone="notice"
      title="This invitation cannot be used"
      action={
        <Link to="/" className={buttonClass('secondary', 'sm')}>
          Your workspaces
        </Link>
      }
    >
      {message}
    </Banner>
  );
}

function SignedOut({ here }: { here: string }) {
  return (
    <div className="flex flex-col gap-4">
      <p className="text-sm text-ink-soft">
        Sign in — or create an account — with the e-mail address the invitation was sent to. You come straight back here
        to accept it.
      </p>
      <div className="flex flex-wrap gap-2">
        <Link to={withNext('/sign-in', here)} className={buttonClass('primary')}>
          Sign in to accept
        </Link>
        <Link to={withNext('/sign-up', here)} className={buttonClass('secondary')}>
          Create an account
        </Link>
      </div>
    </div>
  );
}

function Accept({ token, here }: { token: string; here: string }) {
  const me = useMe();
  const preview = useInvitationPreview(token, true);
  const accept = useAcceptInvitation();
  const signOut = useSignOut();
  const navigate = useNavigate();

  if (preview.isPending) return <LoadingBlock label="Reading the invitation…" />;
  if (preview.isError) {
    const e = preview.error;
    if (isApiError(e) && (e.code === 'invalid_token' || e.status === 404 || e.status === 400))
      return <InvalidInvitation message="The link was used already, revoked by an owner, or has expired. Ask for a new invitation." />;
    return (
      <Banner
        tone="notice"
        title="Could not read the invitation"
        action={
          <Button variant="secondary" size="sm" onClick={() => void preview.refetch()}>
            Try again
          </Button>
        }
      >
        {errorMessage(e)}
      </Banner>
    );
  }

  const inv = preview.data;
  return (
    <div className="flex flex-col gap-5">
      <dl className="grid grid-cols-[auto_1fr] gap-x-6 gap-y-2 text-sm">
        <dt className="text-ink-faint">Workspace</dt>
        <dd className="font-semibold">{inv.workspaceName}</dd>
        <dt className="text-ink-faint">Role</dt>
        <dd>
          <span className="font-medium">{ROLE_LABEL[inv.role]}</span>{' '}
          <span className="text-ink-soft">— can {ROLE_DESCRIPTION[inv.role]}</span>
        </dd>
        <dt className="text-ink-faint">Invited by</dt>
        <dd>{inv.invitedByName}</dd>
        <dt className="text-ink-faint">For</dt>
        <dd>{inv.email}</dd>
        <dt className="text-ink-faint">Valid until</dt>
        <dd className="num">{formatDateTime(inv.expiresAt)}</dd>
      </dl>
      {!inv.emailMatches ? (
        <Banner
          tone="notice"
          title="Signed in with a different address"
          action={
            <Button
              variant="secondary"
              size="sm"
              pending={signOut.isPending}
              onClick={() => signOut.mutate(undefined, { onSuccess: () => navigate(withNext('/sign-in', here)) })}
            >
              Switch account
            </Button>
          }
        >
          This invitation is for {inv.email}; you are signed in as {me.data?.email}. Sign in with the invited address to
          accept it.
        </Banner>
      ) : (
        <>
          {accept.isError && (
            <Banner tone="notice" title="Not accepted">
              {errorMessage(accept.error)}
            </Banner>
          )}
          <div className="flex justify-end">
            <Button
              pending={accept.isPending}
              onClick={() => accept.mutate({ token }, { onSuccess: (w) => navigate(`/w/${w.id}`, { replace: true }) })}
            >
              Join {inv.workspaceName}
            </Button>
          </div>
        </>
      )}
    </div>
  );
}

/** Opened from the invitation e-mail: `/invite/<token>` (or `/invitations/accept?token=…`). */
export default function InviteRoute() {
  const params = useParams();
  const [search] = useSearchParams();
  const location = useLocation();
  const token = params.token ?? search.get('token') ?? '';
  const me = useMe();
  const here = location.pathname + location.search;

  return (
    <AuthLayout title="You are invited" subtitle="Someone would like you to work with them in a Slackline workspace.">
      {!token ? (
        <InvalidInvitation message="The link is missing its token. Open it exactly as it was sent." />
      ) : me.isPending ? (
        <LoadingBlock />
      ) : me.isError ? (
        <Banner tone="notice" title="Could not check whether you are signed in">
          {errorMessage(me.error)}
        </Banner>
      ) : me.data ? (
        <Accept token={token} here={here} />
      ) : (
        <SignedOut here={here} />
      )}
    </AuthLayout>
  );
}
