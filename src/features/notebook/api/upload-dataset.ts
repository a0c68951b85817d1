import { callRoute } from '@/lib/api-client';

/** Multipart upload of a CSV; errors come back in the API's one error shape. */
export function uploadDataset(workspaceId: string, file: File, name: string) {
  return callRoute('uploadDataset', { params: { workspaceId }, body: { name }, file });
}
