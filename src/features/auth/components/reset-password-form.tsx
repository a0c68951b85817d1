import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Button, buttonClass } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { isApiError } from '@/lib/api-client';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useConfirmPasswordReset } from '../api/confirm-password-reset';

const FIELDS = ['password'] as const;

export function ResetPasswordForm({ token }: { token: string }) {
  const confirm = useConfirmPasswordReset();
  const errors = useFormErrors(confirm.error, FIELDS);
  // "repeat password" is checked here only; the server never sees it
  const [mismatch, setMismatch] = useState(false);

  if (confirm.isSuccess) {
    return (
      <div className="flex flex-col gap-4">
        <Banner tone="slack" title="Password changed">
          Every session of your account has been signed out. Sign in with the new password.
        </Banner>
        <Link to="/sign-in" className={buttonClass('primary')}>
          Sign in
        </Link>
      </div>
    );
  }

  const tokenBad =
    isApiError(confirm.error) && (confirm.error.code === 'invalid_token' || confirm.error.fields.token !== undefined);

  return (
    <form
      ref={errors.formRef}
      noValidate
      className="flex flex-col gap-4"
      onSubmit={(e) => {
        e.preventDefault();
        const v = formValues(e.currentTarget);
        if ((v.password ?? '') !== (v.confirm ?? '')) {
          setMismatch(true);
          return;
        }
        confirm.mutate({ token, password: v.password ?? '' });
      }}
    >
      {tokenBad ? (
        <Banner
          tone="notice"
          title="This reset link no longer works"
          action={
            <Link to="/forgot-password" className={buttonClass('secondary', 'sm')}>
              Send a new one
            </Link>
          }
        >
          It was used already, has expired, or was copied incompletely.
        </Banner>
      ) : (
        errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>
      )}
      <Input
        label="New password"
        name="password"
        type="password"
        autoComplete="new-password"
        autoFocus
        hint="At least 10 characters, not a common password."
        error={errors.field('password')}
        onChange={() => errors.onEdit('password')}
      />
      <Input
        label="Repeat new password"
        name="confirm"
        type="password"
        autoComplete="new-password"
        error={mismatch ? 'The two passwords differ' : undefined}
        onChange={() => setMismatch(false)}
      />
      <div className="flex justify-end pt-1">
        <Button type="submit" pending={confirm.isPending}>
          Set new password
        </Button>
      </div>
    </form>
  );
}
