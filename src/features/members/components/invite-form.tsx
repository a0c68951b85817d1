import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Input, Select } from '@/components/ui/input';
import { ROLE_DESCRIPTION, ROLE_LABEL } from '@/components/role-badge';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { INVITABLE_ROLES, useCreateInvitation } from '../api/create-invitation';

const FIELDS = ['email', 'role'] as const;

export function InviteForm({ workspaceId }: { workspaceId: string }) {
  const invite = useCreateInvitation();
  const errors = useFormErrors(invite.error, FIELDS);
  return (
    <form
      ref={errors.formRef}
      noValidate
      aria-label="Invite by e-mail"
      className="flex flex-col gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        const v = formValues(e.currentTarget);
        invite.mutate(
          { workspaceId, email: v.email ?? '', role: (v.role ?? 'viewer') as (typeof INVITABLE_ROLES)[number] },
          { onSuccess: () => errors.formRef.current?.reset() },
        );
      }}
    >
      {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
      {invite.isSuccess && (
        <Banner tone="slack">
          Invitation sent to <strong className="text-ink">{invite.data.email}</strong>. The link in the e-mail works for
          7 days.
        </Banner>
      )}
      <div className="flex flex-col gap-3 sm:flex-row sm:items-start">
        <Input
          label="E-mail address"
          name="email"
          type="email"
          autoComplete="off"
          placeholder="colleague@example.org"
          className="flex-1"
          error={errors.field('email')}
          onChange={() => {
            errors.onEdit('email');
            if (invite.isSuccess) invite.reset();
          }}
        />
        <Select
          label="Role"
          name="role"
          defaultValue="editor"
          className="sm:w-40"
          error={errors.field('role')}
          onChange={() => errors.onEdit('role')}
        >
          {INVITABLE_ROLES.map((r) => (
            <option key={r} value={r} title={`Can ${ROLE_DESCRIPTION[r]}`}>
              {ROLE_LABEL[r]}
            </option>
          ))}
        </Select>
        <Button type="submit" pending={invite.isPending} className="sm:mt-[1.625rem]">
          Send invitation
        </Button>
      </div>
      <p className="text-xs text-ink-faint">
        Editors can {ROLE_DESCRIPTION.editor}; reviewers can {ROLE_DESCRIPTION.reviewer}; viewers can{' '}
        {ROLE_DESCRIPTION.viewer}. To add an owner, invite them first and promote them once they have joined.
      </p>
    </form>
  );
}
