import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useRequestPasswordReset } from '../api/request-password-reset';

const FIELDS = ['email'] as const;

export function ForgotPasswordForm() {
  const request = useRequestPasswordReset();
  const errors = useFormErrors(request.error, FIELDS);

  if (request.isSuccess) {
    return (
      <Banner tone="slack" title="Check your inbox">
        If an account uses <strong className="text-ink">{request.variables.email}</strong>, a link to set a new
        password is on its way. The link works once and for one hour.
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
        request.mutate({ email: formValues(e.currentTarget).email ?? '' });
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
      <div className="flex justify-end pt-1">
        <Button type="submit" pending={request.isPending}>
          Send reset link
        </Button>
      </div>
    </form>
  );
}
