import { useState } from 'react';
import type { Workspace } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { Input } from '@/components/ui/input';
import { errorMessage } from '@/lib/api-client';
import { useDeleteWorkspace } from '../api/delete-workspace';

/** Deleting needs the workspace's name typed out: everything inside goes with it. */
export function DeleteWorkspaceDialog({
  workspace,
  open,
  onClose,
  onDeleted,
}: {
  workspace: Workspace;
  open: boolean;
  onClose: () => void;
  onDeleted: () => void;
}) {
  const del = useDeleteWorkspace();
  const [typed, setTyped] = useState('');
  const matches = typed.trim() === workspace.name.trim();
  const close = () => {
    del.reset();
    setTyped('');
    onClose();
  };
  return (
    <Dialog
      open={open}
      onClose={close}
      title="Delete this workspace?"
      description={
        <>
          <strong className="text-ink">{workspace.name}</strong> and all of its notebooks, data, fits, comments and share
          links will be deleted for every member. This cannot be undone.
        </>
      }
    >
      <form
        className="flex flex-col gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          if (matches) del.mutate({ workspaceId: workspace.id }, { onSuccess: onDeleted });
        }}
      >
        {del.isError && <Banner tone="notice">{errorMessage(del.error)}</Banner>}
        <Input
          label={<>Type the workspace name to confirm</>}
          name="confirm"
          autoComplete="off"
          value={typed}
          onChange={(e) => setTyped(e.target.value)}
        />
        <div className="flex justify-end gap-2 pt-2">
          <Button variant="quiet" onClick={close}>
            Keep it
          </Button>
          <Button type="submit" variant="destructive" disabled={!matches} pending={del.isPending}>
            Delete workspace
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
