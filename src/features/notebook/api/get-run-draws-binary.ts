import { routePath } from '@shared/api';
import { decodeDrawsBinary } from '@shared/api/draws-binary';
import type { RunDraws } from '@shared/api/notebook';
import { ApiError, toApiError } from '@/lib/api-client';

/** A member's draws for plots as Float32 columns (getRunDrawsBinary), decoded to the plots' shape. */
export async function getRunDrawsBinary(workspaceId: string, runId: string, max: number, signal?: AbortSignal): Promise<RunDraws> {
  let res: Response;
  try {
    res = await fetch(`${routePath('getRunDrawsBinary', { workspaceId, runId })}?max=${max}`, { credentials: 'same-origin', signal });
  } catch (e) {
    if (signal?.aborted) throw e;
    throw new ApiError(0, 'network', 'Could not reach the server. Check your connection and try again.');
  }
  if (!res.ok) throw toApiError(res.status, await res.json().catch(() => undefined));
  try {
    return decodeDrawsBinary(await res.arrayBuffer());
  } catch {
    throw new ApiError(200, 'bad_response', 'The server sent draws this page does not understand.');
  }
}
