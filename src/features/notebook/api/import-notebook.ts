import { callRoute } from '@/lib/api-client';

/** Creates a notebook from a notebook file (multipart). */
export function importNotebookFile(workspaceId: string, file: File) {
  return callRoute('importNotebook', { params: { workspaceId }, body: {}, file });
}
