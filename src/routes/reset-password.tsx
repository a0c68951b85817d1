import { Link, useParams, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layout/auth-layout';
import { Banner } from '@/components/ui/banner';
import { buttonClass } from '@/components/ui/button';
import { ResetPasswordForm } from '@/features/auth/components/reset-password-form';

/** Opened from the reset e-mail: `/reset-password?token=…` (or `/reset-password/<token>`). */
export default function ResetPasswordRoute() {
  const [search] = useSearchParams();
  const params = useParams();
  const token = params.token ?? search.get('token') ?? '';
  return (
    <AuthLayout title="Set a new password" subtitle="Choose a new password for your account.">
      {token ? (
        <ResetPasswordForm token={token} />
      ) : (
        <Banner
          tone="notice"
          title="This link is missing its token"
          action={
            <Link to="/forgot-password" className={buttonClass('secondary', 'sm')}>
              Request a link
            </Link>
          }
        >
          Open the link from the e-mail exactly as it was sent.
        </Banner>
      )}
    </AuthLayout>
  );
}
