import { Link } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useSignIn } from '../api/sign-in';

const FIELDS = ['email', 'password'] as const;

export function SignInForm({ onSuccess }: { onSuccess: () => void }) {
  const signIn = useSignIn();
  const errors = useFormErrors(signIn.error, FIELDS);
  return (
    <form
      ref={errors.formRef}
      noValidate
      className="flex flex-col gap-4"
      onSubmit={(e) => {
        e.preventDefault();
        const v = formValues(e.currentTarget);
        signIn.mutate({ email: v.email ?? '', password: v.password ?? '' }, { onSuccess });
      }}
    >
      {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
      <Input
        label="E-mail"
        name="email"
        type="email"
        autoComplete="email"
        autoFocus
        error={errors.field('email')}
        onChange={() => errors.onEdit('email')}
      />
      <Input
        label="Password"
        name="password"
        type="password"
        autoComplete="current-password"
        error={errors.field('password')}
        onChange={() => errors.onEdit('password')}
      />
      <div className="flex items-center justify-between gap-4 pt-1">
        <Link to="/forgot-password" className="text-sm text-ink-soft underline-offset-4 hover:text-ink hover:underline">
          Forgot your password?
        </Link>
        <Button type="submit" pending={signIn.isPending}>
          Sign in
        </Button>
      </div>
    </form>
  );
}
