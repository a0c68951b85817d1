import type { Workspace } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useCreateWorkspace } from '../api/create-workspace';

const FIELDS = ['name'] as const;

export function CreateWorkspaceForm({ onCreated }: { onCreated?: (w: Workspace) => void }) {
  const create = useCreateWorkspace();
  const errors = useFormErrors(create.error, FIELDS);
  return (
    <form
      ref={errors.formRef}
      noValidate
      aria-label="Create a workspace"
      className="flex flex-col gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        create.mutate(
          { name: formValues(e.currentTarget).name ?? '' },
          {
            onSuccess: (w) => {
              errors.formRef.current?.reset();
              onCreated?.(w);
            },
          },
        );
      }}
    >
      {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
      <div className="flex flex-col gap-3 sm:flex-row sm:items-start">
        <Input
          label="New workspace name"
          name="name"
          placeholder="e.g. Orchard irrigation trial"
          className="flex-1"
          maxLength={80}
          error={errors.field('name')}
          onChange={() => errors.onEdit('name')}
        />
        <Button type="submit" pending={create.isPending} className="sm:mt-[1.625rem]">
          Create workspace
        </Button>
      </div>
    </form>
  );
}
