import type { Workspace } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Input } from '@/components/ui/input';
import { formValues, useFormErrors } from '@/lib/use-form-errors';
import { useRenameWorkspace } from '../api/rename-workspace';

const FIELDS = ['name'] as const;

export function RenameWorkspaceDialog({ workspace, open, onClose }: { workspace: Workspace; open: boolean; onClose: () => void }) {
  const rename = useRenameWorkspace();
  const errors = useFormErrors(rename.error, FIELDS);
  const close = () => {
    rename.reset();
    onClose();
  };
  return (
    <Dialog open={open} onClose={close} title="Rename workspace">
      <form
        noValidate
        id="rename-workspace"
        className="flex flex-col gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          rename.mutate({ workspaceId: workspace.id, name: formValues(e.currentTarget).name ?? '' }, { onSuccess: close });
        }}
      >
        {errors.formMessage && <Banner tone="notice">{errors.formMessage}</Banner>}
        <Input
          label="Name"
          name="name"
          defaultValue={workspace.name}
          maxLength={80}
          autoFocus
          error={errors.field('name')}
          onChange={() => errors.onEdit('name')}
        />
        <div className="flex justify-end gap-2 pt-2">
          <Button variant="quiet" onClick={close}>
            Cancel
          </Button>
          <Button type="submit" pending={rename.isPending}>
            Save name
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
