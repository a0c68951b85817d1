import { Link, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layout/auth-layout';
import { SignUpForm } from '@/features/auth/components/sign-up-form';
import { safeNext, withNext } from '@/lib/safe-next';

export default function SignUpRoute() {
  const [params] = useSearchParams();
  // Only a path on this site travels on into the confirmation link.
  const next = safeNext(params.get('next'), '') || null;
  return (
    <AuthLayout
      title="Create your account"
      subtitle="Constrained models, shared notebooks, honest diagnostics."
      footer={
        <>
          Already have an account?{' '}
          <Link to={withNext('/sign-in', next)} className="font-medium text-ink underline underline-offset-4">
            Sign in
          </Link>
        </>
      }
    >
      <SignUpForm next={next} />
    </AuthLayout>
  );
}
