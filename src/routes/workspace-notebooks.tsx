import type { QueryClient } from '@tanstack/react-query';
import { useOutletContext, type LoaderFunctionArgs } from 'react-router-dom';
import { roleAtLeast, type Workspace } from '@shared/api';
import { QueryState } from '@/components/query-state';
import { notebooksQueryOptions, useNotebooks } from '@/features/notebook/api/get-notebooks';
import { CreateNotebookForm } from '@/features/notebook/components/create-notebook-form';
import { ImportNotebookFile } from '@/features/notebook/components/import-notebook-file';
import { NotebookList } from '@/features/notebook/components/notebook-list';

export const makeLoader = (qc: QueryClient) => async ({ params }: LoaderFunctionArgs) => {
  await qc.prefetchQuery(notebooksQueryOptions(params.workspaceId!));
  return null;
};

export default function WorkspaceNotebooksRoute() {
  const workspace = useOutletContext<Workspace>();
  const notebooks = useNotebooks(workspace.id);
  const canEdit = roleAtLeast(workspace.role, 'editor');
  return (
    <div className="flex flex-col gap-6">
      {canEdit && (
        <div className="sheet flex flex-col gap-4 p-5">
          <CreateNotebookForm workspaceId={workspace.id} />
          <ImportNotebookFile workspaceId={workspace.id} />
        </div>
      )}
      <QueryState query={notebooks} loadingLabel="Loading notebooks…" errorTitle="Could not load the notebooks">
        {(list) => <NotebookList notebooks={list} canEdit={canEdit} />}
      </QueryState>
    </div>
  );
}
