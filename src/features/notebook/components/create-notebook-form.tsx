import { useNavigate } from 'react-router-dom';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useCreateNotebook } from '../api/create-notebook';

const FIELDS = ['title'] as const;

/** Create a notebook and open it. */
export function CreateNotebookForm({ workspaceId }: { workspaceId: string }) {
  const create = useCreateNotebook();
  const navigate = useNavigate();
  const errors = useFormErrors(create.error, FIELDS);
  return (
    <form
      ref={errors.formRef}
      noValidate
      aria-label="Create a notebook"
      className="flex flex-col gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        create.mutate(
          { workspaceId, title: formValues(e.currentTarget).title ?? '' },
          { onSuccess: (notebook) => navigate(`/w/${workspaceId}/n/${notebook.id}`) },
        );
      }}
    >
      {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
      <div className="flex flex-col gap-3 sm:flex-row sm:items-start">
        <Input
          label="New notebook title"
          name="title"
          placeholder="e.g. Yield by nitrogen level, ordered"
          className="flex-1"
          maxLength={160}
          error={errors.field('title')}
          onChange={() => errors.onEdit('title')}
        />
        <Button type="submit" pending={create.isPending} className="sm:mt-[1.625rem]">
          Create notebook
        </Button>
      </div>
    </form>
  );
}
