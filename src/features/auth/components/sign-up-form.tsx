import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useSignUp } from '../api/sign-up';

const FIELDS = ['name', 'email', 'password'] as const;

export function SignUpForm({ onSuccess, defaultEmail }: { onSuccess: () => void; defaultEmail?: string }) {
  const signUp = useSignUp();
  const errors = useFormErrors(signUp.error, FIELDS);
  return (
    <form
      ref={errors.formRef}
      noValidate
      className="flex flex-col gap-4"
      onSubmit={(e) => {
        e.preventDefault();
        const v = formValues(e.currentTarget);
        signUp.mutate({ name: v.name ?? '', email: v.email ?? '', password: v.password ?? '' }, { onSuccess });
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
