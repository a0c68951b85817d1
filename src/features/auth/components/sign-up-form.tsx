import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useSignUp } from '../api/sign-up';

const FIELDS = ['name', 'email', 'password'] as const;

/**
 * Asks for an account. The answer is the same whether or not the address has one, so the form
 * always ends on "check your mail"; the link in that mail creates the account (and carries
 * `next`, so an invitation is waiting once it is confirmed).
 */
export function SignUpForm({ next, defaultEmail }: { next?: string | null; defaultEmail?: string }) {
  const signUp = useSignUp();
  const errors = useFormErrors(signUp.error, FIELDS);
  if (signUp.isSuccess) {
    return (
      <Banner tone="slack" title="Check your mail">
        To finish creating your account, open the link we sent to{' '}
        <strong className="text-ink">{signUp.variables.email}</strong>. It works once, for 24 hours. If that address
        already has an account, the mail tells you how to sign in instead.
      </Banner>
    );
  }
  return (
    <form
      ref={errors.formRef}
      noValidate
      className="flex flex-col gap-4"
      onSubmit={(e) => {
        e.preventDefault();
        const v = formValues(e.currentTarget);
        signUp.mutate({ name: v.name ?? '', email: v.email ?? '', password: v.password ?? '', ...(next ? { next } : {}) });
      }}
    >
      {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
      <Input
        label="Your name"
        name="name"
        autoComplete="name"
        autoFocus
        error={errors.field('name')}
        onChange={() => errors.onEdit('name')}
      />
      <Input
        label="E-mail"
        name="email"
        type="email"
        autoComplete="email"
        defaultValue={defaultEmail}
        error={errors.field('email')}
        onChange={() => errors.onEdit('email')}
      />
      <Input
        label="Password"
        name="password"
        type="password"
        autoComplete="new-password"
        hint="At least 10 characters, not a common password. A short sentence works well."
        error={errors.field('password')}
        onChange={() => errors.onEdit('password')}
      />
      <div className="flex justify-end pt-1">
        <Button type="submit" pending={signUp.isPending}>
          Create account
        </Button>
      </div>
    </form>
  );
}
