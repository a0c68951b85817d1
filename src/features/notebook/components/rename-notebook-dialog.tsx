import type { Notebook } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useRenameNotebook } from '../api/rename-notebook';

const FIELDS = ['title'] as const;

export function RenameNotebookDialog({ notebook, open, onClose }: { notebook: Notebook; open: boolean; onClose: () => void }) {
  const rename = useRenameNotebook();
  const errors = useFormErrors(rename.error, FIELDS);
  const close = () => {
    rename.reset();
    onClose();
  };
  return (
    <Dialog open={open} onClose={close} title="Rename notebook">
      <form
        noValidate
        className="flex flex-col gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          rename.mutate(
            { workspaceId: notebook.workspaceId, notebookId: notebook.id, title: formValues(e.currentTarget).title ?? '' },
            { onSuccess: close },
          );
        }}
      >
        {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
        <Input
          label="Title"
          name="title"
          defaultValue={notebook.title}
          maxLength={160}
          autoFocus
          error={errors.field('title')}
          onChange={() => errors.onEdit('title')}
        />
        <div className="flex justify-end gap-2 pt-2">
          <Button variant="quiet" onClick={close}>
            Cancel
          </Button>
          <Button type="submit" pending={rename.isPending}>
            Save title
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
