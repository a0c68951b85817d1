import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layout/auth-layout';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClass } from '@/components/ui/button';
import { useConfirmSignUp } from '@/features/auth/api/confirm-sign-up';
import { errorMessage, isApiError } from '@/lib/api-client';
import { safeNext, withNext } from '@/lib/safe-next';

/**
 * Opened from the confirmation e-mail: `/confirm-sign-up?token=…` (and `&next=…` when the sign-up
 * started from an invitation). The account is created by pressing the button, not by opening the
 * page, so a mail filter that opens links cannot create it.
 */
export default function ConfirmSignUpRoute() {
  const [search] = useSearchParams();
  const navigate = useNavigate();
  const token = search.get('token') ?? '';
  const next = safeNext(search.get('next'), '') || null;
  const confirm = useConfirmSignUp();

  const err = confirm.error;
  const tokenBad = isApiError(err) && (err.code === 'invalid_token' || (err.status === 400 && err.fields.token !== undefined));
  const taken = isApiError(err) && err.status === 409;

  return (
    <AuthLayout title="Confirm your address" subtitle="One step left: create the account this e-mail address asked for.">
      {!token ? (
        <Banner
          tone="notice"
          title="This link is missing its token"
          action={
            <Link to={withNext('/sign-up', next)} className={buttonClass('secondary', 'sm')}>
              Sign up again
            </Link>
          }
        >
          Open the link from the e-mail exactly as it was sent.
        </Banner>
      ) : tokenBad ? (
        <Banner
          tone="notice"
          title="This confirmation link no longer works"
          action={
            <Link to={withNext('/sign-up', next)} className={buttonClass('secondary', 'sm')}>
              Sign up again
            </Link>
          }
        >
          It was used already, has expired (links work for 24 hours), or was copied incompletely. Sign up again for a new
          link; if the account was created, sign in instead.
        </Banner>
      ) : taken ? (
        <Banner
          tone="notice"
          title="This address already has an account"
          action={
            <Link to={withNext('/sign-in', next)} className={buttonClass('secondary', 'sm')}>
              Sign in
            </Link>
          }
        >
          {errorMessage(err)}
        </Banner>
      ) : (
        <div className="flex flex-col gap-4">
          {confirm.isError && (
            <Banner tone="notice" title="Not created">
              {errorMessage(err)}
            </Banner>
          )}
          <p className="text-sm text-ink-soft">
            Create the account with the name and password you chose when signing up. You are signed in right after.
          </p>
          <div className="flex justify-end">
            <Button
              pending={confirm.isPending}
              onClick={() => confirm.mutate({ token }, { onSuccess: () => navigate(safeNext(next), { replace: true }) })}
            >
              Create my account
            </Button>
          </div>
        </div>
      )}
    </AuthLayout>
  );
}
