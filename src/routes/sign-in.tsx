import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { AuthLayout } from '@/components/layout/auth-layout';
import { SignInForm } from '@/features/auth/components/sign-in-form';
import { safeNext, withNext } from '@/lib/safe-next';

export default function SignInRoute() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const next = params.get('next');
  return (
    <AuthLayout
      title="Sign in"
      subtitle="Pick up where your notebooks left off."
      footer={
        <>
          New to Slackline?{' '}
          <Link to={withNext('/sign-up', next)} className="font-medium text-ink underline underline-offset-4">
            Create an account
          </Link>
        </>
      }
    >
      <SignInForm onSuccess={() => navigate(safeNext(next), { replace: true })} />
    </AuthLayout>
  );
}
