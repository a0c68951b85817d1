import type { Notebook } from '@shared/api';
import { Banner } from '@/components/ui/banner';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { errorMessage } from '@/lib/api-client';
import { useDeleteNotebook } from '../api/delete-notebook';

export function DeleteNotebookDialog({
  notebook,
  open,
  onClose,
  onDeleted,
}: {
  notebook: Notebook;
  open: boolean;
  onClose: () => void;
  onDeleted?: () => void;
}) {
  const del = useDeleteNotebook();
  const close = () => {
    del.reset();
    onClose();
  };
  return (
    <Dialog
      open={open}
      onClose={close}
      title="Delete this notebook?"
      description={
        <>
          <strong className="text-ink">{notebook.title}</strong> goes with its cells, fits, comments and share links. This
          cannot be undone.
        </>
      }
      footer={
        <>
          <Button variant="quiet" onClick={close}>
            Keep it
          </Button>
          <Button
            variant="destructive"
            pending={del.isPending}
            onClick={() =>
              del.mutate(
                { workspaceId: notebook.workspaceId, notebookId: notebook.id },
                {
                  onSuccess: () => {
                    close();
                    onDeleted?.();
                  },
                },
              )
            }
          >
            Delete notebook
          </Button>
        </>
      }
    >
      {del.isError && <Banner tone="notice">{errorMessage(del.error)}</Banner>}
    </Dialog>
  );
}
