import { Link } from 'react-router-dom';
import { AuthLayout } from '@/components/layout/auth-layout';
import { ForgotPasswordForm } from '@/features/auth/components/forgot-password-form';

export default function ForgotPasswordRoute() {
  return (
    <AuthLayout
      title="Forgot your password?"
      subtitle="Tell us the address you sign in with and we will e-mail you a link to set a new one."
      footer={
        <Link to="/sign-in" className="font-medium text-ink underline underline-offset-4">
          Back to sign in
        </Link>
      }
    >
      <ForgotPasswordForm />
    </AuthLayout>
  );
}
