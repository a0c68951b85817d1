import { cellConflictResponse, saveCellBody, type CellConflictResponse, type SaveCellBody } from '@shared/api/notebook';
import { ApiError, callRoute, isApiError } from '@/lib/api-client';

export class CellConflictError extends Error {
  constructor(readonly conflict: CellConflictResponse['conflict']) {
    super('conflict');
  }
}

/** Save with a base version; a 409 becomes a CellConflictError carrying both texts. */
export async function saveCell(workspaceId: string, notebookId: string, cellId: string, body: SaveCellBody) {
  const checked = saveCellBody.safeParse(body);
  if (!checked.success) throw new ApiError(400, 'bad_request', checked.error.issues[0]?.message ?? 'Invalid save');
  try {
    return await callRoute('saveCell', { params: { workspaceId, notebookId, cellId }, body: checked.data });
  } catch (e) {
    if (!isApiError(e)) throw e;
    if (e.status === 0) throw new ApiError(0, 'network', 'Could not reach the server; your text is kept here and saving will be retried.');
    if (e.status === 409) {
      const parsed = cellConflictResponse.safeParse(e.body);
      if (parsed.success) throw new CellConflictError(parsed.data.conflict);
    }
    throw e;
  }
}
